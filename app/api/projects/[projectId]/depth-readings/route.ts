import { z } from 'zod';
import { listDepthReadings } from '@/db/depth-readings';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { coverCompliance } from '@/lib/records/depth-compliance';
import { createDepthReading, depthReadingSchema } from '@/lib/services/depth-readings';

// The project's depth readings by route and chainage, each with its compliance against the minimum cover.
export const GET = withRoute({ action: 'record.read', scope: byProjectParam, query: z.object({ routeId: z.uuid().optional() }) }, async ({ db, project, query }) => ({
  minCoverDepthM: project.minCoverDepthM,
  readings: (await listDepthReadings(db, project.id, query.routeId)).map((r) => ({ ...r, compliance: coverCompliance(r.coverM, project.minCoverDepthM) })),
}));

export const POST = withRoute({ action: 'record.write', scope: byProjectParam, side: 'contractor', body: depthReadingSchema }, async ({ db, principal, project, body }) => {
  const reading = await createDepthReading(db, principal, project, body);
  return Response.json({ reading: { ...reading, compliance: coverCompliance(reading.coverM, project.minCoverDepthM) } }, { status: 201 });
});
