'use client';

import { useRouter } from 'next/navigation';
import { useCallback, useMemo, useState } from 'react';
import type { FeatureCollection } from 'geojson';
import { TracePicker, type TraceFix } from '@/components/map/trace-picker';
import { Button, Field, Input, Notice, Select } from '@/components/ui/primitives';
import { formatInZone, wallTimeToUtc } from '@/lib/records/zoned-time';
import { callApi } from './api-client';

const onClock = (t: number, timeZone: string) => formatInZone(t * 1000, timeZone);

/**
 * Keeps a time or distance range of an upload out of matching; the original file keeps it. Times are typed
 * and shown on the project's clock, whatever the browser's; two clicks on the trace map fill "from" and "to".
 */
export function ExcludeRange({ projectId, uploadId, timeZone, fixes, planned, initial }: {
  projectId: string;
  uploadId: string;
  timeZone: string;
  fixes: TraceFix[];
  planned?: FeatureCollection;
  /** a stretch handed over from a section page (epoch seconds) */
  initial?: { fromT: number; toT: number };
}) {
  const router = useRouter();
  const timed = fixes.some((f) => f.t !== null);
  const [kind, setKind] = useState<'time' | 'distance'>(timed ? 'time' : 'distance');
  const [from, setFrom] = useState(initial ? onClock(initial.fromT, timeZone) : '');
  const [to, setTo] = useState(initial ? onClock(initial.toT, timeZone) : '');
  const [reason, setReason] = useState('');
  const [next, setNext] = useState<'from' | 'to'>('from');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [done, setDone] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const range = useMemo(() => {
    if (kind === 'time') {
      const a = wallTimeToUtc(from, timeZone);
      const b = wallTimeToUtc(to, timeZone);
      return a && b ? [Date.parse(a) / 1000, Date.parse(b) / 1000] : null;
    }
    const a = Number(from);
    const b = Number(to);
    return from.trim() && to.trim() && Number.isFinite(a) && Number.isFinite(b) ? [a, b] : null;
  }, [kind, from, to, timeZone]);
  const inRange = useCallback(
    (f: TraceFix) => (range ? (kind === 'time' ? f.t !== null && f.t >= range[0] && f.t <= range[1] : f.alongM >= range[0] && f.alongM <= range[1]) : false),
    [range, kind],
  );
  const picked = fixes.filter(inRange).length;

  const describe = (f: TraceFix) => `${f.t !== null ? `${onClock(f.t, timeZone)} · ` : ''}${f.alongM.toFixed(1)} m along trace ${f.trace + 1}`;
  const onPick = (f: TraceFix) => {
    if (kind === 'time' && f.t === null) {
      setErrors({ form: 'This fix has no time: pick by metres along the trace instead.' });
      return;
    }
    const value = kind === 'time' ? onClock(f.t!, timeZone) : f.alongM.toFixed(1);
    setErrors({});
    setDone(null);
    if (next === 'from') {
      setFrom(value);
      setTo('');
      setNext('to');
      return;
    }
    // a "to" before "from" is taken as the other end: the range is the same stretch either way
    const earlier = kind === 'time' ? (wallTimeToUtc(value, timeZone) ?? '') < (wallTimeToUtc(from, timeZone) ?? '') : Number(value) < Number(from);
    if (earlier) {
      setTo(from);
      setFrom(value);
    } else setTo(value);
    setNext('from');
  };

  async function submit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const local: Record<string, string> = {};
    let body: unknown;
    if (kind === 'time') {
      const a = wallTimeToUtc(from, timeZone);
      const b = wallTimeToUtc(to, timeZone);
      if (!a) local.from = 'Give a date and time as YYYY-MM-DD HH:MM:SS, e.g. 2026-11-05 10:00:38.';
      if (!b) local.to = 'Give a date and time as YYYY-MM-DD HH:MM:SS.';
      body = { kind, from: a, to: b, reason };
    } else {
      if (!from.trim() || !Number.isFinite(Number(from))) local.from = 'Give metres from the start of the trace, e.g. 120.5.';
      if (!to.trim() || !Number.isFinite(Number(to))) local.to = 'Give metres from the start of the trace.';
      body = { kind, from: Number(from), to: Number(to), reason };
    }
    if (Object.keys(local).length) return setErrors(local);
    setBusy(true);
    const res = await callApi<{ exclusion: { fixesLeftOut: number } }>(`/api/projects/${projectId}/uploads/${uploadId}/exclusions`, 'POST', body);
    setBusy(false);
    if (!res.ok) {
      setErrors(Object.keys(res.fieldErrors).length ? res.fieldErrors : { form: res.message });
      return;
    }
    setErrors({});
    setFrom('');
    setTo('');
    setReason('');
    setDone(`${res.data.exclusion.fixesLeftOut} fixes left out of matching; the project is being reconciled again.`);
    router.refresh();
  }

  const unit = kind === 'time' ? `YYYY-MM-DD HH:MM:SS, ${timeZone}` : 'm along the trace';
  // the examples are this upload's own first and last fix, in the form the fields take
  const timedFixes = fixes.filter((f) => f.t !== null);
  const example = timedFixes.length ? [onClock(Math.min(...timedFixes.map((f) => f.t!)), timeZone), onClock(Math.max(...timedFixes.map((f) => f.t!)), timeZone)] : ['', ''];
  return (
    <div className="space-y-4">
      {fixes.length > 0 && (
        <div>
          <p className="mb-2 text-sm text-ink-soft">
            Click a fix on the map for the start of the stretch, then another for its end; point at a fix to see its time and distance.
            {' '}Next click sets <span className="font-medium">{next === 'from' ? '“from”' : '“to”'}</span>.
          </p>
          <TracePicker fixes={fixes} planned={planned} describe={describe} inRange={inRange} onPick={onPick} label="Map of the upload's fixes: click two to pick a stretch" />
        </div>
      )}
      <form onSubmit={submit} className="grid gap-3 sm:grid-cols-6" noValidate aria-label="Leave a stretch out of matching">
        <Field label="Range by" htmlFor="ex-kind">
          <Select id="ex-kind" value={kind} onChange={(e) => { setKind(e.target.value as 'time' | 'distance'); setFrom(''); setTo(''); setNext('from'); }}>
            {timed && <option value="time">Time</option>}
            <option value="distance">Metres along the trace</option>
          </Select>
        </Field>
        <div className="sm:col-span-2">
          <Field label={`From (${unit})`} htmlFor="ex-from" error={errors.from}>
            <Input id="ex-from" name="from" value={from} onChange={(e) => setFrom(e.target.value)} inputMode={kind === 'time' ? 'text' : 'decimal'} placeholder={kind === 'time' ? example[0] : '0'} aria-invalid={!!errors.from} />
          </Field>
        </div>
        <div className="sm:col-span-2">
          <Field label={`To (${unit})`} htmlFor="ex-to" error={errors.to}>
            <Input id="ex-to" name="to" value={to} onChange={(e) => setTo(e.target.value)} inputMode={kind === 'time' ? 'text' : 'decimal'} placeholder={kind === 'time' ? example[1] : '25'} aria-invalid={!!errors.to} />
          </Field>
        </div>
        <Field label="Why" htmlFor="ex-reason" error={errors.reason}>
          <Input id="ex-reason" name="reason" value={reason} onChange={(e) => setReason(e.target.value)} placeholder="e.g. walk back to the van" aria-invalid={!!errors.reason} />
        </Field>
        <div className="flex flex-wrap items-center gap-3 sm:col-span-6">
          <Button type="submit" variant="secondary" disabled={busy}>Leave out</Button>
          {range && <span className="text-sm text-ink-soft" aria-live="polite">{picked} of the {fixes.length} fixes on the map fall in this range.</span>}
        </div>
        {errors.form && <div className="sm:col-span-6"><Notice tone="bad">{errors.form}</Notice></div>}
        {done && <div className="sm:col-span-6"><Notice tone="ok">{done}</Notice></div>}
      </form>
    </div>
  );
}

/** Takes a left-out range back into matching. */
export function RemoveExclusion({ projectId, uploadId, exclusionId }: { projectId: string; uploadId: string; exclusionId: number }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  return (
    <span className="inline-flex items-center gap-2">
      <Button
        type="button"
        variant="secondary"
        className="px-2 py-1 text-xs"
        disabled={busy}
        onClick={async () => {
          setBusy(true);
          const res = await callApi(`/api/projects/${projectId}/uploads/${uploadId}/exclusions/${exclusionId}`, 'DELETE');
          setBusy(false);
          if (!res.ok) return setError(res.message);
          router.refresh();
        }}
      >
        Take back in
      </Button>
      {error && <span className="text-xs text-status-bad">{error}</span>}
    </span>
  );
}
