import contentDisposition from 'content-disposition';
import { Readable } from 'node:stream';
import { withRoute } from '@/lib/api/with-route';
import { byJobParam } from '@/lib/api/scopes';
import { getJob } from '@/db/jobs';
import { AppError } from '@/lib/api/errors';
import { can } from '@/lib/auth/roles';
import { JOB_KINDS, type JobKind } from '@/lib/jobs/kinds';
import { exportsStore } from '@/lib/storage/exports-store';

export const GET = withRoute({ action: 'job.read', scope: byJobParam }, async ({ db, params, principal }) => {
  const job = (await getJob(db, params.jobId))!;
  const spec = JOB_KINDS[job.kind as JobKind];
  if (!spec || !can(principal.role, spec.action)) throw new AppError('forbidden', `Your role (${principal.role}) may not download this result.`);
  const key = job.result?.storageKey;
  if (job.status !== 'completed' || typeof key !== 'string') {
    throw new AppError('conflict', `The job is ${job.status}; its result is not ready.`);
  }
  const size = await exportsStore().size(key);
  if (size === undefined) throw new AppError('not_found', 'The result file is no longer stored.');
  const fileName = String(job.result?.fileName ?? 'result');
  return new Response(Readable.toWeb(exportsStore().get(key)) as ReadableStream, {
    headers: {
      'content-type': String(job.result?.contentType ?? 'application/octet-stream'),
      'content-length': String(size),
      'content-disposition': contentDisposition(fileName),
    },
  });
});
