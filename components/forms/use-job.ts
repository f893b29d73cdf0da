'use client';

import { useEffect, useRef, useState } from 'react';
import { callApi } from './api-client';

export interface JobView {
  id: string;
  status: 'queued' | 'running' | 'completed' | 'failed';
  progress: number;
  message: string;
  resultUrl: string | null;
}

/** Follows a background job's progress every half second until it completes or fails, then calls `onDone`. */
export function useJob(onDone?: (job: JobView) => void) {
  const [job, setJob] = useState<JobView | null>(null);
  const timer = useRef<ReturnType<typeof setInterval> | null>(null);
  useEffect(() => () => { if (timer.current) clearInterval(timer.current); }, []);
  function follow(first: JobView) {
    setJob(first);
    if (timer.current) clearInterval(timer.current);
    timer.current = setInterval(async () => {
      const r = await callApi<{ job: JobView }>(`/api/jobs/${first.id}`, 'GET');
      if (!r.ok) return;
      setJob(r.data.job);
      if (r.data.job.status === 'completed' || r.data.job.status === 'failed') {
        clearInterval(timer.current!);
        onDone?.(r.data.job);
      }
    }, 500);
  }
  const busy = job !== null && (job.status === 'queued' || job.status === 'running');
  return { job, busy, follow };
}
