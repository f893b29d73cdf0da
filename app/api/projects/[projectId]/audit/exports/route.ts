import { NextResponse } from 'next/server';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { enqueueJob } from '@/lib/jobs/queue';
import { publicJob } from '@/db/jobs';

export const POST = withRoute({ action: 'audit.export', scope: byProjectParam }, async ({ db, principal, project }) => {
  const job = await enqueueJob(db, { projectId: project.id, kind: 'audit-export', createdBy: principal.id });
  return NextResponse.json({ job: publicJob(job) }, { status: 202 });
});
