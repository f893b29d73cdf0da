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

/** The job as the API shows it: `{id, kind, status, progress, message}` plus where to fetch its result. */
export function publicJob(job: Job) {
  const { id, kind, status, progress, message, projectId, createdAt, finishedAt, result } = job;
  const resultUrl = status === 'completed' && typeof result?.storageKey === 'string' ? `/api/jobs/${id}/result` : null;
  return { id, kind, status, progress, message, projectId, createdAt, finishedAt, resultUrl };
}
