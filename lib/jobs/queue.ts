import type { Knex } from 'knex';
import { beatJob, claimJob, getJob, getJobInput, insertJob, setQueueJobId, updateJob, type Job } from '@/db/jobs';
import { env } from '@/lib/env';
import { getBoss } from './boss';
import { JOB_KINDS, type JobKind } from './kinds';

// A job that outlives this in the queue without being picked up or finishing is failed by pg-boss itself.
const QUEUE_EXPIRY_SECONDS = 6 * 3600;

/** Records the job and queues it; the returned job is `queued` with progress 0. */
export async function enqueueJob(
  db: Knex,
  j: { projectId: string; kind: JobKind; input?: Record<string, unknown>; createdBy: string | null },
): Promise<Job> {
  const job = await insertJob(db, { ...j, input: j.input ?? {} });
  try {
    const boss = await getBoss();
    await boss.createQueue(j.kind);
    const queueJobId = await boss.send(j.kind, { jobId: job.id }, { retryLimit: 0, expireInSeconds: QUEUE_EXPIRY_SECONDS });
    if (!queueJobId) throw new Error('the queue refused the job');
    await setQueueJobId(db, job.id, queueJobId);
  } catch (err) {
    await updateJob(db, job.id, { status: 'failed', message: `The job could not be queued: ${(err as Error).message}` });
    throw err;
  }
  return job;
}

/**
 * Runs one job by id: claims it (only a queued job runs, once), beats while it runs, reports progress, and
 * stores the result or the failure. A job whose worker dies is failed later by the sweep (settle.ts).
 */
export async function runJob(db: Knex, jobId: string): Promise<void> {
  const job = await getJob(db, jobId);
  if (!job || !(await claimJob(db, jobId))) return;
  const spec = JOB_KINDS[job.kind as JobKind];
  const beat = setInterval(() => void beatJob(db, jobId).catch(() => undefined), env().JOB_HEARTBEAT_SECONDS * 1000);
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
    // when the database itself is gone this update fails too; the sweep then fails the job once it is back
    await updateJob(db, jobId, {
      status: 'failed',
      message: err instanceof Error ? err.message : 'The job failed.',
    }).catch(() => undefined);
  } finally {
    clearInterval(beat);
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
