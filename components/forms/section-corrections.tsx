'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Button, Field, Input, Notice, Select } from '@/components/ui/primitives';
import { callApi } from './api-client';
import { useJob, type JobView } from './use-job';

type Kind = 'split' | 'merge' | 'reassign' | 'mark_built' | 'promote' | 'not_built_reason';

const KIND_LABELS: Record<Kind, string> = {
  split: 'Split at a chainage',
  merge: 'Merge with the neighbouring section',
  reassign: 'Move to another route',
  mark_built: 'Count built on another source',
  promote: 'Promote to a planned route',
  not_built_reason: 'Say why it is not built',
};

export interface CorrectionTarget {
  id: string;
  status: 'as_planned' | 'deviates' | 'unplanned' | 'not_built';
  fromM: number;
  toM: number;
  neighbours: { id: string; label: string }[];
  routes: { ref: string; label: string }[];
  uploads: { id: string; label: string }[];
  accuracyClasses: { value: string; label: string }[];
}

/** The corrections that fit a section's status: built ones split, merge and move; gaps get a reason or a source; unplanned ones are promoted. */
export function kindsFor(t: CorrectionTarget): Kind[] {
  if (t.status === 'unplanned') return ['promote'];
  if (t.status === 'not_built') return ['not_built_reason', 'mark_built'];
  return ['split', ...(t.neighbours.length ? (['merge'] as const) : []), 'reassign'];
}

/** An engineer's correction of one section, with the reason; the project is reconciled again and the page follows. */
export function SectionCorrections({ target }: { target: CorrectionTarget }) {
  const router = useRouter();
  const kinds = kindsFor(target);
  const [kind, setKind] = useState<Kind>(kinds[0]);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const { job, busy, follow } = useJob(() => router.refresh());

  async function submit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const raw = (k: string) => String(f.get(k) ?? '').trim();
    const num = (k: string) => (raw(k) === '' ? undefined : Number(raw(k)));
    const opt = (k: string) => raw(k) || undefined;
    const body: Record<string, unknown> = { kind, reason: raw('reason') };
    if (kind === 'split') body.atChainageM = num('atChainageM') ?? Number.NaN;
    if (kind === 'merge') body.withSectionId = raw('withSectionId');
    if (kind === 'reassign') Object.assign(body, { toRouteRef: raw('toRouteRef'), fromChainageM: num('fromChainageM'), toChainageM: num('toChainageM') });
    if (kind === 'mark_built') Object.assign(body, { fromChainageM: num('fromChainageM'), toChainageM: num('toChainageM'), sourceUploadId: opt('sourceUploadId'), accuracyClass: opt('accuracyClass'), laidOn: opt('laidOn') });
    if (kind === 'promote') Object.assign(body, { ref: raw('ref'), street: opt('street'), routeKind: raw('routeKind') });
    const res = await callApi<{ job: JobView }>(`/api/sections/${target.id}/corrections`, 'POST', body);
    if (!res.ok) return setErrors(Object.keys(res.fieldErrors).length ? res.fieldErrors : { form: res.message });
    setErrors({});
    follow(res.data.job);
  }

  const range = (
    <>
      <Field label="From (m)" htmlFor="c-from" error={errors.fromChainageM} hint={`from ${target.fromM.toFixed(1)}`}>
        <Input id="c-from" name="fromChainageM" type="number" step="any" defaultValue={target.fromM.toFixed(1)} aria-invalid={!!errors.fromChainageM} />
      </Field>
      <Field label="To (m)" htmlFor="c-to" error={errors.toChainageM} hint={`up to ${target.toM.toFixed(1)}`}>
        <Input id="c-to" name="toChainageM" type="number" step="any" defaultValue={target.toM.toFixed(1)} aria-invalid={!!errors.toChainageM} />
      </Field>
    </>
  );

  return (
    <form onSubmit={submit} className="grid gap-3 sm:grid-cols-3" noValidate aria-label="Correct this section">
      <Field label="Correction" htmlFor="c-kind" error={errors.kind}>
        <Select id="c-kind" value={kind} onChange={(e) => { setKind(e.target.value as Kind); setErrors({}); }}>
          {kinds.map((k) => <option key={k} value={k}>{KIND_LABELS[k]}</option>)}
        </Select>
      </Field>
      {kind === 'split' && (
        <Field label="Split at chainage (m)" htmlFor="c-at" error={errors.atChainageM} hint={`between ${(target.fromM + 1).toFixed(1)} and ${(target.toM - 1).toFixed(1)}`}>
          <Input id="c-at" name="atChainageM" type="number" step="any" aria-invalid={!!errors.atChainageM} />
        </Field>
      )}
      {kind === 'merge' && (
        <Field label="Merge with" htmlFor="c-with" error={errors.withSectionId}>
          <Select id="c-with" name="withSectionId">
            {target.neighbours.map((n) => <option key={n.id} value={n.id}>{n.label}</option>)}
          </Select>
        </Field>
      )}
      {kind === 'reassign' && (
        <>
          <Field label="Belongs to route" htmlFor="c-route" error={errors.toRouteRef}>
            <Select id="c-route" name="toRouteRef" aria-invalid={!!errors.toRouteRef}>
              {target.routes.map((r) => <option key={r.ref} value={r.ref}>{r.label}</option>)}
            </Select>
          </Field>
          {range}
        </>
      )}
      {kind === 'mark_built' && (
        <>
          {range}
          <Field label="Source upload (optional)" htmlFor="c-source" error={errors.sourceUploadId}>
            <Select id="c-source" name="sourceUploadId" defaultValue="">
              <option value="">none: a paper or photo record</option>
              {target.uploads.map((u) => <option key={u.id} value={u.id}>{u.label}</option>)}
            </Select>
          </Field>
          <Field label="Its accuracy" htmlFor="c-acc" hint="the upload's own when one is chosen">
            <Select id="c-acc" name="accuracyClass" defaultValue="">
              <option value="">from the upload, else unknown</option>
              {target.accuracyClasses.map((a) => <option key={a.value} value={a.value}>{a.label}</option>)}
            </Select>
          </Field>
          <Field label="Laid on" htmlFor="c-laid" error={errors.laidOn}>
            <Input id="c-laid" name="laidOn" type="date" aria-invalid={!!errors.laidOn} />
          </Field>
        </>
      )}
      {kind === 'promote' && (
        <>
          <Field label="New route reference" htmlFor="c-ref" error={errors.ref}>
            <Input id="c-ref" name="ref" aria-invalid={!!errors.ref} />
          </Field>
          <Field label="Street" htmlFor="c-street" error={errors.street}>
            <Input id="c-street" name="street" />
          </Field>
          <Field label="Kind" htmlFor="c-routekind">
            <Select id="c-routekind" name="routeKind" defaultValue="street">
              <option value="street">street route</option>
              <option value="crossing">road crossing</option>
            </Select>
          </Field>
        </>
      )}
      <div className="sm:col-span-3">
        <Field label="Reason (goes into the audit log)" htmlFor="c-reason" error={errors.reason}>
          <Input id="c-reason" name="reason" aria-invalid={!!errors.reason} />
        </Field>
      </div>
      <div className="flex flex-wrap items-center gap-3 sm:col-span-3">
        <Button type="submit" disabled={busy}>Record correction</Button>
        {job && (
          <div className="w-64 text-xs" aria-live="polite">
            <progress className="h-2 w-full accent-brand" max={1} value={job.progress} aria-label="Reconciliation progress" />
            <p className="mt-1 text-ink-soft">{job.status === 'completed' ? 'Correction applied.' : job.message || 'Reconciling…'}</p>
          </div>
        )}
      </div>
      {errors.form && <div className="sm:col-span-3"><Notice tone="bad">{errors.form}</Notice></div>}
    </form>
  );
}

/** Withdraws a correction; the project is reconciled again without it. */
export function WithdrawCorrection({ id }: { id: number }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const { busy, follow } = useJob(() => router.refresh());
  async function withdraw() {
    const res = await callApi<{ job: JobView }>(`/api/corrections/${id}`, 'DELETE');
    if (!res.ok) return setError(res.message);
    follow(res.data.job);
  }
  return (
    <span className="inline-flex items-center gap-2">
      <Button type="button" variant="secondary" onClick={withdraw} disabled={busy} aria-label={`Withdraw correction ${id}`}>Withdraw</Button>
      {error && <span className="text-xs text-status-bad">{error}</span>}
    </span>
  );
}
