import type { Knex } from 'knex';
import type PgBoss from 'pg-boss';
import { failUnfinishedJob, listUnfinishedJobs, type UnfinishedJob } from '@/db/jobs';

/** A running job silent for this many heartbeats is taken for dead. */
export const MISSED_BEATS = 3;
/** A queued job gets this long to reach the queue before a missing queue copy counts as lost. */
const QUEUE_GRACE_SECONDS = 60;

type QueueState = 'created' | 'retry' | 'active' | 'completed' | 'cancelled' | 'failed' | 'missing';

/** The job's copy in pg-boss: its state, and when a worker took it (the database's clock). */
export interface QueueCopy {
  state: QueueState;
  startedOn?: Date | null;
}

export interface SettleOutcome {
  jobId: string;
  kind: string;
  was: 'queued' | 'running';
  reason: string;
}

const seconds = (from: Date, to: Date) => (to.getTime() - from.getTime()) / 1000;
const when = (d: Date) => d.toISOString().replace(/\.\d+Z$/, 'Z');

/**
 * Why an unfinished job can never finish, or undefined while it still may. Pure, so that every case is
 * tested without killing anything: a running job whose heartbeat stopped (its worker process or the
 * database went away), and a queued job whose copy in the queue is gone, failed or finished.
 */
export function stuckReason(job: UnfinishedJob, queue: QueueCopy, heartbeatSeconds: number): string | undefined {
  const queueState = queue.state;
  if (job.status === 'running') {
    const last = job.heartbeatAt ?? job.startedAt ?? job.createdAt;
    const silent = seconds(last, job.now);
    if (silent <= MISSED_BEATS * heartbeatSeconds) return undefined;
    return `Stopped without finishing: its worker or the database went away (last sign of life ${when(last)}, ${Math.round(silent)} s before this check). Nothing it was doing was kept; start it again.`;
  }
  if (queueState === 'created' || queueState === 'retry') return undefined;
  if (queueState === 'active') {
    // a worker claims its job the moment it takes it from the queue; one that took it and never claimed it died
    const taken = queue.startedOn ?? job.createdAt;
    if (seconds(taken, job.now) <= MISSED_BEATS * heartbeatSeconds) return undefined;
    return `Never started: a worker took it from the queue at ${when(taken)} and stopped before starting it. Start it again.`;
  }
  if (queueState === 'missing' && seconds(job.createdAt, job.now) <= QUEUE_GRACE_SECONDS) return undefined;
  const what = queueState === 'missing' ? 'is no longer in the queue' : `was ${queueState} by the queue`;
  return `Never started: its queue entry ${what} (queued ${when(job.createdAt)}). Start it again.`;
}

/**
 * Brings the app's job rows in line with the queue: every queued or running job that can no longer finish
 * is failed with its reason, and its copy in the queue is failed too so that it is never delivered late.
 * Run at worker start-up and periodically (housekeeping.ts).
 */
export async function settleJobs(db: Knex, boss: PgBoss, heartbeatSeconds: number): Promise<SettleOutcome[]> {
  const out: SettleOutcome[] = [];
  for (const job of await listUnfinishedJobs(db)) {
    const copy = job.queueJobId ? await boss.getJobById(job.kind, job.queueJobId, { includeArchive: true }).catch(() => null) : null;
    const state = (copy?.state as QueueState | undefined) ?? 'missing';
    const reason = stuckReason(job, { state, startedOn: copy?.startedOn ?? null }, heartbeatSeconds);
    if (!reason) continue;
    if (!(await failUnfinishedJob(db, job.id, job.status, reason))) continue;
    if (job.queueJobId && (state === 'created' || state === 'retry' || state === 'active')) {
      await boss.fail(job.kind, job.queueJobId, { reason }).catch(() => undefined);
    }
    out.push({ jobId: job.id, kind: job.kind, was: job.status, reason });
  }
  return out;
}
