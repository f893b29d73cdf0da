import type { Db } from './client';
import type { RecordSettings } from './projects';
import { recordsOnSection } from './record-anchors';
import { restorationVerdict, type RestorationVerdict } from '@/lib/records/restoration';

/** A laying temperature reading: instant (ISO) or null, °C. */
export interface TemperatureReading {
  measuredAt: string | null;
  tempC: number;
}

/** A surface restoration as the API and the pages see it, with its verdict against the project's settings. */
export interface Restoration {
  id: string;
  projectId: string;
  routeId: string;
  routeRef: string;
  routeRemoved: boolean;
  fromChainageM: number;
  toChainageM: number;
  /** instants (ISO); the pages show them on the project's clock */
  restoredAt: string;
  backfillMaterialId: string | null;
  backfillMaterial: string | null;
  compactionPasses: number;
  requiredThicknessMm: number;
  laidThicknessMm: number | null;
  edgesCleanedAt: string | null;
  surfaceLaidAt: string | null;
  crew: string;
  note: string;
  temperatures: TemperatureReading[];
  check: RestorationVerdict;
  createdByName: string | null;
  createdAt: string;
  updatedAt: string;
}

export interface RestorationValues {
  fromChainageM: number;
  toChainageM: number;
  restoredAt: string;
  backfillMaterialId: string | null;
  compactionPasses: number;
  requiredThicknessMm: number;
  laidThicknessMm: number | null;
  edgesCleanedAt: string | null;
  surfaceLaidAt: string | null;
  crew: string;
  note: string;
}

type Limits = Pick<RecordSettings, 'layingTempTargetC' | 'layingTempToleranceC' | 'compactionPassesDefault' | 'restorationMaxDelayMin'>;

const iso = (d: Date | null) => (d ? d.toISOString() : null);

const columns = [
  'rec.id', 'rec.project_id', 'rec.route_id', 'r.ref as route_ref', 'r.removed_in_version', 'rec.from_chainage_m', 'rec.to_chainage_m', 'rec.restored_at',
  'rec.backfill_material_id', 'bm.label as backfill_label', 'rec.compaction_passes', 'rec.required_thickness_mm', 'rec.laid_thickness_mm', 'rec.edges_cleaned_at',
  'rec.surface_laid_at', 'rec.crew', 'rec.note', 'u.name as created_by_name', 'rec.created_at', 'rec.updated_at',
  // the laying limits of the record's own project, so that a list across sections needs no second read
  'p.laying_temp_target_c', 'p.laying_temp_tolerance_c', 'p.compaction_passes_default', 'p.restoration_max_delay_min',
];

const withJoins = <Q extends ReturnType<Db>>(q: Q) =>
  q
    .join('projects as p', 'p.id', 'rec.project_id')
    .leftJoin('backfill_materials as bm', 'bm.id', 'rec.backfill_material_id')
    .leftJoin('users as u', 'u.id', 'rec.created_by');

async function toDtos(db: Db, rows: Record<string, any>[]): Promise<Restoration[]> {
  const ids = rows.map((r) => r.id);
  const temps = ids.length === 0 ? [] : await db('restoration_temperatures').whereIn('restoration_id', ids).orderBy([{ column: 'measured_at', order: 'asc', nulls: 'last' }, 'id']).select('restoration_id', 'measured_at', 'temp_c');
  const byId = new Map<string, TemperatureReading[]>();
  for (const t of temps) {
    const list = byId.get(t.restoration_id) ?? [];
    list.push({ measuredAt: iso(t.measured_at), tempC: t.temp_c });
    byId.set(t.restoration_id, list);
  }
  return rows.map((r) => {
    const temperatures = byId.get(r.id) ?? [];
    const limits: Limits = { layingTempTargetC: r.laying_temp_target_c, layingTempToleranceC: r.laying_temp_tolerance_c, compactionPassesDefault: r.compaction_passes_default, restorationMaxDelayMin: r.restoration_max_delay_min };
    const dto: Omit<Restoration, 'check'> = {
      id: r.id, projectId: r.project_id, routeId: r.route_id, routeRef: r.route_ref, routeRemoved: r.removed_in_version !== null,
      fromChainageM: r.from_chainage_m, toChainageM: r.to_chainage_m, restoredAt: r.restored_at.toISOString(),
      backfillMaterialId: r.backfill_material_id, backfillMaterial: r.backfill_label ?? null, compactionPasses: r.compaction_passes,
      requiredThicknessMm: r.required_thickness_mm, laidThicknessMm: r.laid_thickness_mm, edgesCleanedAt: iso(r.edges_cleaned_at),
      surfaceLaidAt: iso(r.surface_laid_at), crew: r.crew, note: r.note, temperatures, createdByName: r.created_by_name ?? null,
      createdAt: r.created_at.toISOString(), updatedAt: r.updated_at.toISOString(),
    };
    const check = restorationVerdict({ temperaturesC: temperatures.map((t) => t.tempC), laidThicknessMm: dto.laidThicknessMm, requiredThicknessMm: dto.requiredThicknessMm, compactionPasses: dto.compactionPasses, edgesCleanedAt: dto.edgesCleanedAt, surfaceLaidAt: dto.surfaceLaidAt }, limits);
    return { ...dto, check };
  });
}

const rowOf = (v: RestorationValues) => ({
  from_chainage_m: v.fromChainageM,
  to_chainage_m: v.toChainageM,
  restored_at: v.restoredAt,
  backfill_material_id: v.backfillMaterialId,
  compaction_passes: v.compactionPasses,
  required_thickness_mm: v.requiredThicknessMm,
  laid_thickness_mm: v.laidThicknessMm,
  edges_cleaned_at: v.edgesCleanedAt,
  surface_laid_at: v.surfaceLaidAt,
  crew: v.crew,
  note: v.note,
});

export async function getRestoration(db: Db, id: string): Promise<Restoration | undefined> {
  const row = await withJoins(db('restorations as rec').join('planned_routes as r', 'r.id', 'rec.route_id')).where('rec.id', id).first(columns);
  return row ? (await toDtos(db, [row]))[0] : undefined;
}

/** The project's restorations, by route and chainage. */
export async function listRestorations(db: Db, projectId: string): Promise<Restoration[]> {
  const rows = await withJoins(db('restorations as rec').join('planned_routes as r', 'r.id', 'rec.route_id'))
    .where('rec.project_id', projectId)
    .orderBy([{ column: 'r.ref' }, { column: 'rec.from_chainage_m' }, { column: 'rec.restored_at' }])
    .select(columns);
  return toDtos(db, rows);
}

/** The restorations whose stretch touches a section's, with their verdicts: for the section's page. */
export async function listRestorationsOnSection(db: Db, section: { projectId: string; plannedRouteRef: string | null; fromChainageM: number; toChainageM: number }): Promise<Restoration[]> {
  const rows = await withJoins(recordsOnSection(db, 'restorations', section, 'stretch')).orderBy([{ column: 'rec.from_chainage_m' }, { column: 'rec.restored_at' }]).select(columns);
  return toDtos(db, rows);
}

export async function insertRestoration(db: Db, projectId: string, routeId: string, v: RestorationValues, userId: string): Promise<string> {
  const [row] = await db('restorations').insert({ project_id: projectId, route_id: routeId, ...rowOf(v), created_by: userId, updated_by: userId }).returning('id');
  return row.id;
}

export async function updateRestoration(db: Db, id: string, v: RestorationValues, userId: string): Promise<void> {
  await db('restorations').where({ id }).update({ ...rowOf(v), updated_by: userId, updated_at: db.fn.now() });
}

/** Replaces the readings of a restoration (instants or null, °C). */
export async function replaceTemperatures(db: Db, restorationId: string, readings: { measuredAt: string | null; tempC: number }[]): Promise<void> {
  await db('restoration_temperatures').where({ restoration_id: restorationId }).del();
  if (readings.length > 0) await db('restoration_temperatures').insert(readings.map((t) => ({ restoration_id: restorationId, measured_at: t.measuredAt, temp_c: t.tempC })));
}

export async function deleteRestoration(db: Db, id: string): Promise<void> {
  await db('restorations').where({ id }).del();
}
