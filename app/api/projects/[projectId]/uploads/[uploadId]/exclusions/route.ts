import { NextResponse } from 'next/server';
import { withRoute } from '@/lib/api/with-route';
import { byUploadParam } from '@/lib/api/scopes';
import { publicJob } from '@/db/jobs';
import { excludeFromMatching, exclusionSchema } from '@/lib/services/exclusions';

// Engineers keep a stretch of an upload out of matching, e.g. the walk back to the van.
export const POST = withRoute({ action: 'reconcile.run', scope: byUploadParam, body: exclusionSchema }, async ({ db, principal, project, params, body }) => {
  const { exclusion, job } = await excludeFromMatching(db, principal, project.id, params.uploadId, body);
  return NextResponse.json({ exclusion, job: publicJob(job) }, { status: 201 });
});
