import { withRoute } from '@/lib/api/with-route';
import { byUploadParam } from '@/lib/api/scopes';
import { AppError } from '@/lib/api/errors';
import { publicJob } from '@/db/jobs';
import { removeExclusion } from '@/lib/services/exclusions';

// A left-out range goes back into matching; the audit log keeps what it was.
export const DELETE = withRoute({ action: 'reconcile.run', scope: byUploadParam }, async ({ db, principal, project, params }) => {
  if (!/^\d{1,15}$/.test(params.exclusionId ?? '')) throw new AppError('not_found', 'No such left-out range.');
  const { job } = await removeExclusion(db, principal, project.id, params.uploadId, Number(params.exclusionId));
  return { removed: Number(params.exclusionId), job: publicJob(job) };
});
