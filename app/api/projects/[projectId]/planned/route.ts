import { NextResponse } from 'next/server';
import { z } from 'zod';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { receiveMultipart } from '@/lib/api/multipart';
import { env } from '@/lib/env';
import { listPlanVersions } from '@/db/planned';
import { importPlan, plannedFeatureCollection } from '@/lib/services/planned';

export const GET = withRoute(
  { action: 'plan.read', scope: byProjectParam, query: z.object({ format: z.enum(['geojson']).optional(), removed: z.enum(['0', '1']).default('0') }) },
  async ({ db, project, query }) => {
    const collection = await plannedFeatureCollection(db, project.id, query.removed === '1');
    if (query.format === 'geojson') {
      return new NextResponse(JSON.stringify(collection), { headers: { 'content-type': 'application/geo+json' } });
    }
    return { versions: await listPlanVersions(db, project.id), routeCount: collection.features.length };
  },
);

export const POST = withRoute({ action: 'plan.import', scope: byProjectParam }, async ({ req, db, principal, project }) => {
  const form = await receiveMultipart(req, env().UPLOAD_MAX_BYTES);
  try {
    const { version, created } = await importPlan(db, principal, project, form);
    return NextResponse.json({ version }, { status: created ? 201 : 200 });
  } finally {
    await form.cleanup();
  }
});
