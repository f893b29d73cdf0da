// TEST ONLY: one approved, current section (an unplanned 50 m line) in a project, so that the isolation matrix
// can build a handover package of a project made through the API without uploads and a reconciliation.
// node --import tsx tests/helpers/approved-section-fixture.ts <projectId>   (DATABASE_URL as the server's)
import type { Knex } from 'knex';

export async function insertApprovedSection(db: Knex, projectId: string): Promise<string> {
  const [row] = await db('sections').insert({
    project_id: projectId, planned_route_ref: null, status: 'unplanned', from_chainage_m: 0, to_chainage_m: 50,
    geom: db.raw("ST_GeomFromText('LINESTRING(9.95 52.95, 9.9507 52.95)', 4326)"), length_m: 50, accuracy_m: 0.05,
    laid_on: '2026-11-03', first_run: 1, last_run: 1, review: 'approved',
  }).returning('id');
  return row.id as string;
}

if (process.argv[1] && process.argv[1].endsWith('approved-section-fixture.ts')) {
  (async () => {
    const { closeDb, getDb } = await import('../../db/client');
    console.log(await insertApprovedSection(getDb(), process.argv[2]));
    await closeDb();
  })().catch((err) => {
    console.error(err);
    process.exit(1);
  });
}
