import type { Db } from './client';
import { dayOnClock, type ProductionCorrection, type ProductionFact, type ProductionQuantity } from '@/lib/records/production';

/** Whether a table exists (the records of other parts arrive in migrations of their own). */
async function tableExists(db: Db, table: string): Promise<boolean> {
  const r = await db.raw('select to_regclass(?) as t', [`public.${table}`]);
  return r.rows[0].t !== null;
}

/**
 * The facts daily production is derived from (see lib/records/production.ts for what counts as what), each
 * on its day on the project's clock. Reads only the columns named there, and a table only when it exists.
 */
export async function listProductionFacts(db: Db, projectId: string, timeZone: string): Promise<ProductionFact[]> {
  const facts: ProductionFact[] = [];
  const push = (day: string, crew: string, quantity: ProductionQuantity, value: number) => facts.push({ day, crew, quantity, value });

  // built sections by their lay date; the crew is the one named on the section's uploads (the first that names one)
  const sections = await db('sections as s')
    .where('s.project_id', projectId)
    .whereNull('s.retired_in_run')
    .whereNotNull('s.laid_on')
    .whereNot('s.status', 'not_built')
    .select(
      db.raw("to_char(s.laid_on, 'YYYY-MM-DD') as day"),
      's.length_m',
      db.raw("coalesce((select u.crew from uploads u where u.id = any(s.source_upload_ids) and u.crew <> '' order by u.created_at, u.id limit 1), '') as crew"),
    );
  for (const s of sections) {
    push(s.day, s.crew, 'laid_m', s.length_m);
    push(s.day, s.crew, 'sawn_m', s.length_m);
  }

  const restorations = await db('restorations').where({ project_id: projectId }).select('from_chainage_m', 'to_chainage_m', 'restored_at', 'surface_laid_at', 'backfill_material_id', 'crew');
  for (const r of restorations) {
    const length = r.to_chainage_m - r.from_chainage_m;
    if (r.backfill_material_id) push(dayOnClock(r.restored_at, timeZone), r.crew, 'backfilled_m', length);
    push(dayOnClock(r.surface_laid_at ?? r.restored_at, timeZone), r.crew, 'restored_m', length);
  }

  if (await tableExists(db, 'road_crossings')) {
    const crossings = await db('road_crossings').where({ project_id: projectId, built: true }).whereNotNull('built_on').select(db.raw("to_char(built_on, 'YYYY-MM-DD') as day"), 'length_m');
    for (const c of crossings) {
      push(c.day, '', 'crossings', 1);
      if (c.length_m !== null) push(c.day, '', 'sawn_m', c.length_m);
    }
  }
  if (await tableExists(db, 'test_pits')) {
    const pits = await db('test_pits').where({ project_id: projectId }).whereNotNull('dug_on').select(db.raw("to_char(dug_on, 'YYYY-MM-DD') as day"));
    for (const p of pits) push(p.day, '', 'pits', 1);
  }
  return facts;
}

const toCorrection = (r: Record<string, any>): ProductionCorrection & { projectId: string } => ({
  id: r.id, projectId: r.project_id, day: r.day, crew: r.crew, quantity: r.quantity, value: r.value, reason: r.reason,
  createdAt: r.created_at.toISOString(), createdByName: r.created_by_name ?? null,
});

const correctionColumns = (db: Db) => ['c.id', 'c.project_id', db.raw("to_char(c.day, 'YYYY-MM-DD') as day"), 'c.crew', 'c.quantity', 'c.value', 'c.reason', 'c.created_at', 'u.name as created_by_name'];

export async function listProductionCorrections(db: Db, projectId: string): Promise<ProductionCorrection[]> {
  const rows = await db('production_corrections as c').leftJoin('users as u', 'u.id', 'c.created_by').where('c.project_id', projectId).orderBy([{ column: 'c.created_at' }, { column: 'c.id' }]).select(correctionColumns(db));
  return rows.map(toCorrection);
}

export async function getProductionCorrection(db: Db, id: string): Promise<(ProductionCorrection & { projectId: string }) | undefined> {
  const row = await db('production_corrections as c').leftJoin('users as u', 'u.id', 'c.created_by').where('c.id', id).first(correctionColumns(db));
  return row && toCorrection(row);
}

export async function insertProductionCorrection(db: Db, projectId: string, v: { day: string; crew: string; quantity: ProductionQuantity; value: number; reason: string }, userId: string): Promise<string> {
  // clock_timestamp, not now(): two corrections in one transaction still have an order
  const [row] = await db('production_corrections').insert({ project_id: projectId, ...v, created_by: userId, created_at: db.raw('clock_timestamp()') }).returning('id');
  return row.id;
}

export async function deleteProductionCorrection(db: Db, id: string): Promise<void> {
  await db('production_corrections').where({ id }).del();
}
