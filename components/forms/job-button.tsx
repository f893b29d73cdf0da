'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Button, Notice } from '@/components/ui/primitives';
import { callApi } from './api-client';
import { useJob, type JobView } from './use-job';

/** Starts a background job, shows its progress bar, and offers the result when it is done. */
export function JobButton({ startUrl, label, resultLabel, refreshOnDone = false }: { startUrl: string; label: string; resultLabel: string; refreshOnDone?: boolean }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const { job, busy, follow } = useJob(() => { if (refreshOnDone) router.refresh(); });

  async function start() {
    setError(null);
    const res = await callApi<{ job: JobView }>(startUrl, 'POST');
    if (!res.ok) return setError(res.message);
    follow(res.data.job);
  }

  return (
    <div className="flex flex-col items-end gap-2">
      <Button variant="secondary" onClick={start} disabled={busy}>
        {label}
      </Button>
      {job && (
        <div className="w-64 text-xs" aria-live="polite">
          <progress className="h-2 w-full accent-brand" max={1} value={job.progress} aria-label={`${label} progress`} />
          <p className="mt-1 text-ink-soft">{job.message}</p>
          {job.status === 'completed' && job.resultUrl && <a href={job.resultUrl}>{resultLabel}</a>}
          {job.status === 'failed' && <Notice tone="bad">{job.message}</Notice>}
        </div>
      )}
      {error && <Notice tone="bad">{error}</Notice>}
    </div>
  );
}
