import type { Db } from './client';
import type { JobRow, JobStatus } from './tables';

export interface Job {
  id: string;
  projectId: string;
  kind: string;
  status: JobStatus;
  progress: number;
  message: string;
  result: Record<string, unknown> | null;
  createdAt: string;
  finishedAt: string | null;
}

const toDto = (r: JobRow): Job => ({
  id: r.id,
  projectId: r.project_id,
  kind: r.kind,
  status: r.status,
  progress: r.progress,
  message: r.message,
  result: r.result,
  createdAt: r.created_at.toISOString(),
  finishedAt: r.finished_at?.toISOString() ?? null,
});

export async function insertJob(
  db: Db,
  j: { projectId: string; kind: string; input: Record<string, unknown>; createdBy: string | null },
): Promise<Job> {
  const [row] = await db<JobRow>('jobs')
    .insert({ project_id: j.projectId, kind: j.kind, input: j.input, created_by: j.createdBy, message: 'Queued' })
    .returning('*');
  return toDto(row);
}

export async function getJob(db: Db, id: string): Promise<Job | undefined> {
  const row = await db<JobRow>('jobs').where({ id }).first();
  return row && toDto(row);
}

export async function getJobInput(db: Db, id: string): Promise<Record<string, unknown> | undefined> {
  const row = await db<JobRow>('jobs').where({ id }).first('input');
  return row?.input;
}

export async function updateJob(
  db: Db,
  id: string,
  patch: Partial<{ status: JobStatus; progress: number; message: string; result: Record<string, unknown> }>,
): Promise<void> {
  const values: Record<string, unknown> = { ...patch };
  if (patch.result !== undefined) values.result = JSON.stringify(patch.result);
  if (patch.status === 'running') values.started_at = db.fn.now();
  if (patch.status === 'completed' || patch.status === 'failed') values.finished_at = db.fn.now();
  await db('jobs').where({ id }).update(values);
}

/**
 * Marks a queued job running, if it still is queued: a job the sweep has failed, or one delivered twice,
 * is not run. Returns whether this caller won it.
 */
export async function claimJob(db: Db, id: string): Promise<boolean> {
  const n = await db('jobs')
    .where({ id, status: 'queued' })
    .update({ status: 'running', progress: 0, message: 'Started', started_at: db.fn.now(), heartbeat_at: db.fn.now() });
  return n === 1;
}

export async function setQueueJobId(db: Db, id: string, queueJobId: string): Promise<void> {
  await db('jobs').where({ id }).update({ queue_job_id: queueJobId });
}

export async function beatJob(db: Db, id: string): Promise<void> {
  await db('jobs').where({ id, status: 'running' }).update({ heartbeat_at: db.fn.now() });
}

export interface UnfinishedJob {
  id: string;
  kind: string;
  status: 'queued' | 'running';
  queueJobId: string | null;
  createdAt: Date;
  heartbeatAt: Date | null;
  startedAt: Date | null;
  /** the database's clock, so that ages never mix two machines' clocks */
  now: Date;
}

export async function listUnfinishedJobs(db: Db): Promise<UnfinishedJob[]> {
  const rows = await db('jobs')
    .whereIn('status', ['queued', 'running'])
    .orderBy('created_at')
    .select('id', 'kind', 'status', 'queue_job_id', 'created_at', 'heartbeat_at', 'started_at', db.raw('now() as now'));
  return rows.map((r) => ({ id: r.id, kind: r.kind, status: r.status, queueJobId: r.queue_job_id, createdAt: r.created_at, heartbeatAt: r.heartbeat_at, startedAt: r.started_at, now: r.now }));
}

/** Fails an unfinished job with a reason, unless it finished meanwhile. Returns whether it was changed. */
export async function failUnfinishedJob(db: Db, id: string, status: 'queued' | 'running', reason: string): Promise<boolean> {
  const n = await db('jobs').where({ id, status }).update({ status: 'failed', message: reason, finished_at: db.fn.now() });
  return n === 1;
}

/** The job as the API shows it: `{id, kind, status, progress, message}` plus where to fetch its result. */
export function publicJob(job: Job) {
  const { id, kind, status, progress, message, projectId, createdAt, finishedAt, result } = job;
  const resultUrl = status === 'completed' && typeof result?.storageKey === 'string' ? `/api/jobs/${id}/result` : null;
  return { id, kind, status, progress, message, projectId, createdAt, finishedAt, resultUrl };
}

/** A project's latest jobs, newest first: the project page shows what ran and how it ended. */
export async function listRecentJobs(db: Db, projectId: string, limit = 5): Promise<Job[]> {
  const rows = await db<JobRow>('jobs').where({ project_id: projectId }).orderBy('created_at', 'desc').limit(limit);
  return rows.map(toDto);
}
