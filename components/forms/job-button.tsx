'use client';

import { useEffect, useRef, useState } from 'react';
import { Button, Notice } from '@/components/ui/primitives';
import { callApi } from './api-client';

interface JobView {
  id: string;
  status: 'queued' | 'running' | 'completed' | 'failed';
  progress: number;
  message: string;
  resultUrl: string | null;
}

/** Starts a background job, shows its progress bar, and offers the result when it is done. */
export function JobButton({ startUrl, label, resultLabel }: { startUrl: string; label: string; resultLabel: string }) {
  const [job, setJob] = useState<JobView | null>(null);
  const [error, setError] = useState<string | null>(null);
  const timer = useRef<ReturnType<typeof setInterval> | null>(null);

  useEffect(() => () => { if (timer.current) clearInterval(timer.current); }, []);

  async function start() {
    setError(null);
    const res = await callApi<{ job: JobView }>(startUrl, 'POST');
    if (!res.ok) return setError(res.message);
    setJob(res.data.job);
    timer.current = setInterval(async () => {
      const r = await callApi<{ job: JobView }>(`/api/jobs/${res.data.job.id}`, 'GET');
      if (!r.ok) return;
      setJob(r.data.job);
      if (r.data.job.status === 'completed' || r.data.job.status === 'failed') clearInterval(timer.current!);
    }, 500);
  }

  const busy = job !== null && (job.status === 'queued' || job.status === 'running');
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
