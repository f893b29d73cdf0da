'use client';

import { useRouter } from 'next/navigation';
import { useId, useState } from 'react';
import { Button, Field, Input, Notice, Select } from '@/components/ui/primitives';
import { callApi } from './api-client';

/**
 * Records taken from a stored upload: depth readings from the attribute that holds the depth, or test pits
 * from the points a code marks. `path` is the route after the upload id, e.g. 'depth-readings/from-upload'.
 */
export function TakeFromUpload({ projectId, path, uploads, field, label, hint, placeholder, submitLabel, what }: {
  projectId: string;
  path: 'depth-readings/from-upload' | 'test-pits/from-upload';
  uploads: { id: string; label: string }[];
  field: 'attribute' | 'code';
  label: string;
  hint: string;
  placeholder: string;
  submitLabel: string;
  what: [string, string];
}) {
  const router = useRouter();
  const ids = { upload: useId(), value: useId() };
  const [uploadId, setUploadId] = useState('');
  const [value, setValue] = useState('');
  const [busy, setBusy] = useState(false);
  const [result, setResult] = useState<{ tone: 'ok' | 'bad'; text: string; lines?: string[] } | null>(null);
  async function send() {
    setBusy(true);
    setResult(null);
    const res = await callApi<{ stored: number }>(`/api/projects/${projectId}/${path.replace('/from-upload', `/from-upload/${uploadId}`)}`, 'POST', { [field]: value.trim() });
    setBusy(false);
    if (res.ok) {
      setResult({ tone: 'ok', text: `Stored ${res.data.stored} ${res.data.stored === 1 ? what[0] : what[1]}.` });
      router.refresh();
    } else {
      setResult({ tone: 'bad', text: res.message });
    }
  }
  if (uploads.length === 0) return <p className="text-sm text-ink-soft">No stored upload yet.</p>;
  return (
    <form className="flex max-w-xl flex-col gap-4" onSubmit={(e) => { e.preventDefault(); void send(); }}>
      <Field label="Upload" htmlFor={ids.upload}>
        <Select id={ids.upload} value={uploadId} onChange={(e) => setUploadId(e.target.value)} className="min-h-12 text-base">
          <option value="">Pick the upload</option>
          {uploads.map((u) => <option key={u.id} value={u.id}>{u.label}</option>)}
        </Select>
      </Field>
      <Field label={label} htmlFor={ids.value} hint={hint}>
        <Input id={ids.value} value={value} onChange={(e) => setValue(e.target.value)} placeholder={placeholder} className="min-h-12 text-base" />
      </Field>
      <Button type="submit" className="min-h-12 w-full text-base sm:w-auto" disabled={!uploadId || !value.trim() || busy}>{busy ? 'Sending…' : submitLabel}</Button>
      <div aria-live="polite">{result && <Notice tone={result.tone}>{result.text}</Notice>}</div>
    </form>
  );
}
