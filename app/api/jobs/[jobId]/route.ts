import { withRoute } from '@/lib/api/with-route';
import { byJobParam } from '@/lib/api/scopes';
import { getJob } from '@/db/jobs';

export const GET = withRoute({ action: 'job.read', scope: byJobParam }, async ({ db, params }) => {
  const job = (await getJob(db, params.jobId))!;
  const { id, kind, status, progress, message, projectId, createdAt, finishedAt, result } = job;
  const resultUrl = status === 'completed' && result?.storageKey ? `/api/jobs/${id}/result` : null;
  return { job: { id, kind, status, progress, message, projectId, createdAt, finishedAt, resultUrl } };
});
