// TEST ONLY: an issued handover revision as a finished build leaves it (row, snapshot of the project's current
// sections, a small stored file), for the isolation matrix and the e2e specs while the package builder
// (lib/services/handovers.ts, helper E1) is not there to make one. Not a way to issue a package: it writes no
// manifest and no real ZIP.
// node --import tsx tests/helpers/handover-fixture.ts <projectId>   (DATABASE_URL, STORAGE_DIR as the server's)
import { createHash, randomUUID } from 'node:crypto';
import { mkdir, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { Knex } from 'knex';

export async function insertIssuedHandover(db: Knex, projectId: string, storageDir: string): Promise<{ id: string; revision: number }> {
  const bytes = Buffer.from(`test handover fixture ${randomUUID()}\n`);
  const key = `handovers/fixture-${randomUUID()}.zip`;
  await mkdir(path.join(storageDir, 'handovers'), { recursive: true });
  await writeFile(path.join(storageDir, key), bytes);
  const sections = await db('sections').where({ project_id: projectId }).whereNull('retired_in_run').orderBy(['planned_route_ref', 'from_chainage_m']).select('id');
  return db.transaction(async (trx) => {
    await trx.raw('SELECT pg_advisory_xact_lock(hashtext(?))', [`handover-fixture:${projectId}`]);
    const { max } = (await trx('handovers').where({ project_id: projectId }).max('revision as max').first()) as { max: number | null };
    const revision = (max ?? 0) + 1;
    const [row] = await trx('handovers').insert({
      project_id: projectId, revision, status: 'issued', storage_key: key, size_bytes: bytes.length, sha256: createHash('sha256').update(bytes).digest('hex'),
      file_name: `handover-r${revision}.zip`, issued_at: trx.fn.now(), note: 'test fixture', snapshot: JSON.stringify({ sections: sections.map((s: { id: string }) => ({ id: s.id })) }),
    }).returning('id');
    return { id: row.id as string, revision };
  });
}

if (process.argv[1] && process.argv[1].endsWith('handover-fixture.ts')) {
  (async () => {
    const { closeDb, getDb } = await import('../../db/client');
    const out = await insertIssuedHandover(getDb(), process.argv[2], process.env.STORAGE_DIR ?? 'storage');
    console.log(out.id);
    await closeDb();
  })().catch((err) => {
    console.error(err);
    process.exit(1);
  });
}
