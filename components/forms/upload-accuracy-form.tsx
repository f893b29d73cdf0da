'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Button, Field, Notice, Select } from '@/components/ui/primitives';
import { ACCURACY_CLASS_LABELS, ACCURACY_CLASSES, R95_FACTOR, type AccuracyClass } from '@/lib/records/accuracy-classes';
import { callApi } from './api-client';

/**
 * The upload's accuracy class, set afterwards (an RTK survey uploaded under the project's default, say). The
 * project is reconciled again so that the sections' 95 % radii follow.
 */
export function UploadAccuracyForm({ projectId, uploadId, current, sigmas }: { projectId: string; uploadId: string; current: AccuracyClass; sigmas: Record<AccuracyClass, number> }) {
  const router = useRouter();
  const [value, setValue] = useState<AccuracyClass>(current);
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  return (
    <form
      aria-label="Accuracy of this upload"
      className="mt-4 space-y-2 border-t border-ink/10 pt-4"
      onSubmit={async (e) => {
        e.preventDefault();
        setBusy(true);
        const res = await callApi<{ reconciling: boolean }>(`/api/projects/${projectId}/uploads/${uploadId}`, 'PATCH', { accuracy: value });
        setBusy(false);
        if (!res.ok) return setError(res.fieldErrors.accuracy ?? res.message);
        setError(null);
        setDone(res.data.reconciling ? 'Saved. The project is being reconciled again: the sections from this upload take the new radius.' : 'Saved.');
        router.refresh();
      }}
    >
      <Field label="How accurate is this upload?" htmlFor="upload-accuracy" error={error ?? undefined}>
        <Select id="upload-accuracy" value={value} onChange={(e) => setValue(e.target.value as AccuracyClass)}>
          {ACCURACY_CLASSES.map((c) => (
            <option key={c} value={c}>
              {ACCURACY_CLASS_LABELS[c]} (σ {sigmas[c]} m, 95 % within {(sigmas[c] * R95_FACTOR).toFixed(2)} m)
            </option>
          ))}
        </Select>
      </Field>
      <Button type="submit" disabled={busy || value === current}>Save the accuracy</Button>
      {done && <Notice tone="ok">{done}</Notice>}
    </form>
  );
}
