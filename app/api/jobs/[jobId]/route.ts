import { withRoute } from '@/lib/api/with-route';
import { byJobParam } from '@/lib/api/scopes';
import { getJob, publicJob } from '@/db/jobs';

export const GET = withRoute({ action: 'job.read', scope: byJobParam }, async ({ db, params }) => ({
  job: publicJob((await getJob(db, params.jobId))!),
}));
