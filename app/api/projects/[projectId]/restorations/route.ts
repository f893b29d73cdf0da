import { NextResponse } from 'next/server';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { listRestorations } from '@/db/restorations';
import { restorationSchema } from '@/lib/records/restoration-schema';
import { createRestoration } from '@/lib/services/restorations';

// The project's surface restorations, each with its verdict (pass, warn, fail) and the reasons.
export const GET = withRoute({ action: 'record.read', scope: byProjectParam }, async ({ db, project }) => ({
  restorations: await listRestorations(db, project.id),
}));

export const POST = withRoute({ action: 'record.write', scope: byProjectParam, side: 'contractor', body: restorationSchema }, async ({ db, principal, project, body }) => {
  const restoration = await createRestoration(db, principal, project, body);
  return NextResponse.json({ restoration }, { status: 201 });
});
