'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Button, Field, Input, Notice, Select } from '@/components/ui/primitives';
import { callApi } from './api-client';
import { useJob, type JobView } from './use-job';

const textareaClass = 'block w-full rounded-md border border-ink/20 bg-white px-3 py-2 text-sm shadow-inner';

/**
 * The contractor's build form: what goes into the package (every approved section, chosen routes, or an
 * area), the coordinate systems of its files and a note; then the build job's progress bar.
 */
export function HandoverBuildForm({ projectId, routes, projectCrs }: { projectId: string; routes: { ref: string; name: string }[]; projectCrs: string | null }) {
  const router = useRouter();
  const [mode, setMode] = useState<'all' | 'routes' | 'bbox'>('all');
  const [picked, setPicked] = useState<string[]>([]);
  const [bbox, setBbox] = useState(['', '', '', '']);
  const [inProjectCrs, setInProjectCrs] = useState(projectCrs !== null);
  const [note, setNote] = useState('');
  const [error, setError] = useState<string | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const { job, busy, follow } = useJob(() => router.refresh());

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    setFieldErrors({});
    const scope = { ...(mode === 'routes' ? { routes: picked } : mode === 'bbox' ? { bbox: bbox.map(Number) } : {}), projectCrs: inProjectCrs };
    const res = await callApi<{ job?: JobView }>(`/api/projects/${projectId}/handovers`, 'POST', { scope, note });
    if (!res.ok) {
      setFieldErrors(res.fieldErrors);
      return setError(res.message);
    }
    if (res.data.job) follow(res.data.job);
    router.refresh();
  }

  return (
    <form onSubmit={submit} className="space-y-4" aria-label="Build a handover package">
      <fieldset className="space-y-2">
        <legend className="text-sm font-medium">What goes in</legend>
        {([['all', 'Every approved section'], ['routes', 'The approved sections of chosen routes'], ['bbox', 'The approved sections in an area']] as const).map(([v, label]) => (
          <label key={v} className="flex items-center gap-2 text-sm">
            <input type="radio" name="scope" value={v} checked={mode === v} onChange={() => setMode(v)} /> {label}
          </label>
        ))}
        {fieldErrors.scope && <p className="text-xs font-medium text-status-bad">{fieldErrors.scope}</p>}
      </fieldset>
      {mode === 'routes' && (
        <fieldset className="grid grid-cols-1 gap-1 sm:grid-cols-2" aria-label="Routes">
          {routes.map((r) => (
            <label key={r.ref} className="flex items-center gap-2 text-sm">
              <input type="checkbox" checked={picked.includes(r.ref)} onChange={(e) => setPicked(e.target.checked ? [...picked, r.ref] : picked.filter((x) => x !== r.ref))} />
              {r.ref}{r.name ? ` ${r.name}` : ''}
            </label>
          ))}
        </fieldset>
      )}
      {mode === 'bbox' && (
        <div className="grid grid-cols-2 gap-2 sm:grid-cols-4">
          {(['West', 'South', 'East', 'North'] as const).map((label, i) => (
            <Field key={label} label={`${label} (°)`} htmlFor={`bbox-${i}`}>
              <Input id={`bbox-${i}`} inputMode="decimal" value={bbox[i]} onChange={(e) => setBbox(bbox.map((v, j) => (j === i ? e.target.value : v)))} />
            </Field>
          ))}
        </div>
      )}
      <fieldset className="space-y-1">
        <legend className="text-sm font-medium">Coordinate systems of the files</legend>
        <p className="text-sm">WGS 84 longitude/latitude (EPSG:4326), always</p>
        {projectCrs && (
          <label className="flex items-center gap-2 text-sm">
            <input type="checkbox" checked={inProjectCrs} onChange={(e) => setInProjectCrs(e.target.checked)} />
            Also in the project&apos;s coordinate system ({projectCrs})
          </label>
        )}
      </fieldset>
      <Field label="Note" htmlFor="handover-note" error={fieldErrors.note}>
        <textarea id="handover-note" className={textareaClass} rows={2} maxLength={2000} value={note} onChange={(e) => setNote(e.target.value)} />
      </Field>
      <Button type="submit" disabled={busy}>Build the package</Button>
      {job && (
        <div className="text-xs" aria-live="polite">
          <progress className="h-2 w-full accent-brand" max={1} value={job.progress} aria-label="Building the package" />
          <p className="mt-1 text-ink-soft">{job.message}</p>
          {job.status === 'failed' && <Notice tone="bad">{job.message}</Notice>}
        </div>
      )}
      {error && <Notice tone="bad">{error}</Notice>}
    </form>
  );
}

interface DraftComment {
  sectionId: string;
  text: string;
}

/** The owner's review: accept, or return with comments on the package's sections and a general comment. */
export function HandoverReviewForm({ handoverId, revision, sections }: { handoverId: string; revision: number; sections: { id: string; label: string }[] }) {
  const router = useRouter();
  const [decision, setDecision] = useState<'accept' | 'return'>('accept');
  const [drafts, setDrafts] = useState<DraftComment[]>([{ sectionId: '', text: '' }]);
  const [general, setGeneral] = useState('');
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    const comments = [
      ...drafts.filter((d) => d.text.trim()).map((d) => ({ sectionId: d.sectionId || null, text: d.text })),
      ...(general.trim() ? [{ text: general }] : []),
    ];
    setBusy(true);
    const res = await callApi(`/api/handovers/${handoverId}/review`, 'POST', { decision, comments });
    setBusy(false);
    if (!res.ok) return setError(res.message);
    router.refresh();
  }

  return (
    <form onSubmit={submit} className="space-y-3" aria-label={`Review revision ${revision}`}>
      <fieldset className="flex flex-wrap gap-4">
        <legend className="sr-only">Decision</legend>
        <label className="flex items-center gap-2 text-sm"><input type="radio" name={`decision-${handoverId}`} checked={decision === 'accept'} onChange={() => setDecision('accept')} /> Accept</label>
        <label className="flex items-center gap-2 text-sm"><input type="radio" name={`decision-${handoverId}`} checked={decision === 'return'} onChange={() => setDecision('return')} /> Return with comments</label>
      </fieldset>
      {drafts.map((d, i) => (
        <div key={i} className="grid grid-cols-1 gap-2 sm:grid-cols-[14rem_1fr]">
          <Field label={`Section of comment ${i + 1}`} htmlFor={`c-${handoverId}-${i}-section`}>
            <Select id={`c-${handoverId}-${i}-section`} value={d.sectionId} onChange={(e) => setDrafts(drafts.map((x, j) => (j === i ? { ...x, sectionId: e.target.value } : x)))}>
              <option value="">The package as a whole</option>
              {sections.map((s) => <option key={s.id} value={s.id}>{s.label}</option>)}
            </Select>
          </Field>
          <Field label={`Comment ${i + 1}`} htmlFor={`c-${handoverId}-${i}-text`}>
            <textarea id={`c-${handoverId}-${i}-text`} className={textareaClass} rows={2} maxLength={4000} value={d.text} onChange={(e) => setDrafts(drafts.map((x, j) => (j === i ? { ...x, text: e.target.value } : x)))} />
          </Field>
        </div>
      ))}
      <Button type="button" variant="secondary" onClick={() => setDrafts([...drafts, { sectionId: '', text: '' }])}>Another comment on a section</Button>
      <Field label="General comment" htmlFor={`c-${handoverId}-general`}>
        <textarea id={`c-${handoverId}-general`} className={textareaClass} rows={2} maxLength={4000} value={general} onChange={(e) => setGeneral(e.target.value)} />
      </Field>
      <Button type="submit" disabled={busy}>{decision === 'accept' ? `Accept revision ${revision}` : `Return revision ${revision}`}</Button>
      {error && <Notice tone="bad">{error}</Notice>}
    </form>
  );
}

/** The contractor's answers to the owner's open comments on a returned revision. */
export function HandoverAnswerForm({ handoverId, comments }: { handoverId: string; comments: { id: number; label: string; text: string }[] }) {
  const router = useRouter();
  const [texts, setTexts] = useState<Record<number, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    const answers = comments.filter((c) => texts[c.id]?.trim()).map((c) => ({ commentId: c.id, text: texts[c.id] }));
    setBusy(true);
    const res = await callApi(`/api/handovers/${handoverId}/answers`, 'POST', { answers });
    setBusy(false);
    if (!res.ok) return setError(res.message);
    setTexts({});
    router.refresh();
  }

  return (
    <form onSubmit={submit} className="space-y-3" aria-label="Answer the comments">
      {comments.map((c) => (
        <Field key={c.id} label={`Answer to “${c.text.length > 60 ? `${c.text.slice(0, 60)}…` : c.text}” (${c.label})`} htmlFor={`a-${c.id}`}>
          <textarea id={`a-${c.id}`} className={textareaClass} rows={2} maxLength={4000} value={texts[c.id] ?? ''} onChange={(e) => setTexts({ ...texts, [c.id]: e.target.value })} />
        </Field>
      ))}
      <Button type="submit" variant="secondary" disabled={busy}>Send the answers</Button>
      {error && <Notice tone="bad">{error}</Notice>}
    </form>
  );
}
