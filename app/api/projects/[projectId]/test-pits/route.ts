import { listTestPits } from '@/db/test-pits';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { createTestPit, testPitSchema } from '@/lib/services/test-pits';

export const GET = withRoute({ action: 'record.read', scope: byProjectParam }, async ({ db, project }) => ({ pits: await listTestPits(db, project.id) }));

export const POST = withRoute({ action: 'record.write', scope: byProjectParam, side: 'contractor', body: testPitSchema }, async ({ db, principal, project, body }) =>
  Response.json({ pit: await createTestPit(db, principal, project, body) }, { status: 201 }),
);
