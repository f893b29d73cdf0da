import { NextResponse } from 'next/server';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { listCrossingRoutes } from '@/db/road-crossings';
import { roadCrossingSchema } from '@/lib/records/road-crossing-schema';
import { createRoadCrossing } from '@/lib/services/road-crossings';

// Every crossing route of the plan with its record (null: not built yet).
export const GET = withRoute({ action: 'record.read', scope: byProjectParam }, async ({ db, project }) => ({
  crossings: await listCrossingRoutes(db, project.id),
}));

export const POST = withRoute({ action: 'record.write', scope: byProjectParam, side: 'contractor', body: roadCrossingSchema }, async ({ db, principal, project, body }) => {
  const crossing = await createRoadCrossing(db, principal, project, body);
  return NextResponse.json({ crossing }, { status: 201 });
});
