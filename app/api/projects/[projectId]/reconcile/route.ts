import { NextResponse } from 'next/server';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { publicJob } from '@/db/jobs';
import { requestReconciliation } from '@/lib/services/reconcile';

export const POST = withRoute({ action: 'reconcile.run', scope: byProjectParam }, async ({ db, principal, project }) =>
  NextResponse.json({ job: publicJob(await requestReconciliation(db, project.id, principal.id)) }, { status: 202 }),
);
