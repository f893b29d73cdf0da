'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Button, Field, Input, Notice, Select } from '@/components/ui/primitives';
import { callApi } from './api-client';

/** Keeps a time or distance range of an upload out of matching; the original file keeps it. */
export function ExcludeRange({ projectId, uploadId }: { projectId: string; uploadId: string }) {
  const router = useRouter();
  const [kind, setKind] = useState<'time' | 'distance'>('time');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [done, setDone] = useState<string | null>(null);
  async function submit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const raw = (k: string) => String(f.get(k) ?? '').trim();
    const value = (k: string) => (kind === 'time' ? (raw(k) ? new Date(raw(k)).toISOString() : '') : Number(raw(k)));
    const res = await callApi(`/api/projects/${projectId}/uploads/${uploadId}/exclusions`, 'POST', { kind, from: value('from'), to: value('to'), reason: raw('reason') });
    if (!res.ok) {
      setErrors(Object.keys(res.fieldErrors).length ? res.fieldErrors : { form: res.message });
      return;
    }
    setErrors({});
    setDone('Left out of matching; the project is being reconciled again.');
    router.refresh();
  }
  return (
    <form onSubmit={submit} className="grid gap-3 sm:grid-cols-5" noValidate>
      <Field label="Range by" htmlFor="ex-kind">
        <Select id="ex-kind" value={kind} onChange={(e) => setKind(e.target.value as 'time' | 'distance')}>
          <option value="time">Time</option>
          <option value="distance">Metres along the trace</option>
        </Select>
      </Field>
      <Field label="From" htmlFor="ex-from" error={errors.from}>
        <Input id="ex-from" name="from" type={kind === 'time' ? 'datetime-local' : 'number'} step={kind === 'time' ? 1 : 'any'} />
      </Field>
      <Field label="To" htmlFor="ex-to" error={errors.to}>
        <Input id="ex-to" name="to" type={kind === 'time' ? 'datetime-local' : 'number'} step={kind === 'time' ? 1 : 'any'} />
      </Field>
      <Field label="Why" htmlFor="ex-reason" error={errors.reason}>
        <Input id="ex-reason" name="reason" placeholder="e.g. walk back to the van" />
      </Field>
      <div className="flex items-end">
        <Button type="submit" variant="secondary">Leave out</Button>
      </div>
      {errors.form && <div className="sm:col-span-5"><Notice tone="bad">{errors.form}</Notice></div>}
      {done && <div className="sm:col-span-5"><Notice tone="ok">{done}</Notice></div>}
    </form>
  );
}
