import { listUtilityCrossings } from '@/db/test-pits';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { clearanceStatus } from '@/lib/records/utility-clearance';
import { createUtilityCrossing, utilityCrossingSchema } from '@/lib/services/test-pits';

// Utility crossings, each with its clearance against the project's minimum.
export const GET = withRoute({ action: 'record.read', scope: byProjectParam }, async ({ db, project }) => ({
  minClearanceM: project.records.minClearanceM,
  crossings: (await listUtilityCrossings(db, project.id)).map((c) => ({ ...c, clearance: clearanceStatus(c.clearanceM, project.records.minClearanceM) })),
}));

export const POST = withRoute({ action: 'record.write', scope: byProjectParam, side: 'contractor', body: utilityCrossingSchema }, async ({ db, principal, project, body }) =>
  Response.json(await createUtilityCrossing(db, principal, project, body), { status: 201 }),
);
