import type { Knex } from 'knex';
import { getJob, getJobInput, insertJob, updateJob, type Job } from '@/db/jobs';
import { getBoss } from './boss';
import { JOB_KINDS, type JobKind } from './kinds';

/** Records the job and queues it; the returned job is `queued` with progress 0. */
export async function enqueueJob(
  db: Knex,
  j: { projectId: string; kind: JobKind; input?: Record<string, unknown>; createdBy: string | null },
): Promise<Job> {
  const job = await insertJob(db, { ...j, input: j.input ?? {} });
  const boss = await getBoss();
  await boss.createQueue(j.kind);
  await boss.send(j.kind, { jobId: job.id }, { retryLimit: 0 });
  return job;
}

/** Runs one job by id: marks it running, reports progress, stores the result or the failure. */
export async function runJob(db: Knex, jobId: string): Promise<void> {
  const job = await getJob(db, jobId);
  if (!job) return;
  const spec = JOB_KINDS[job.kind as JobKind];
  await updateJob(db, jobId, { status: 'running', progress: 0, message: 'Started' });
  try {
    const input = (await getJobInput(db, jobId)) ?? {};
    if (!spec) throw new Error(`Unknown job kind ${job.kind}`);
    const out = await spec.run({
      db,
      jobId,
      projectId: job.projectId,
      input,
      progress: (fraction, message) =>
        updateJob(db, jobId, { progress: Math.max(0, Math.min(1, fraction)), message }),
    });
    await updateJob(db, jobId, { status: 'completed', progress: 1, message: out.message, result: out.result });
  } catch (err) {
    console.error(`[trenchbook] job ${jobId} (${job.kind}) failed`, err);
    await updateJob(db, jobId, {
      status: 'failed',
      message: err instanceof Error ? err.message : 'The job failed.',
    });
  }
}

/** Starts a worker for every job kind in this process. */
export async function startWorkers(db: Knex): Promise<void> {
  const boss = await getBoss();
  for (const kind of Object.keys(JOB_KINDS)) {
    await boss.createQueue(kind);
    await boss.work<{ jobId: string }>(kind, { pollingIntervalSeconds: 0.5, batchSize: 1 }, async (jobs) => {
      for (const j of jobs) await runJob(db, j.data.jobId);
    });
  }
}
