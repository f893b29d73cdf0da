import type { Db } from './client';
import { recordsOnSection } from './record-anchors';
import type { PointAnchor } from '@/lib/records/anchor';

export type DepthSource = 'typed' | 'csv' | 'upload';

/** A depth reading as the API and the pages see it. */
export interface DepthReading {
  id: string;
  projectId: string;
  routeId: string;
  routeRef: string;
  routeRemoved: boolean;
  chainageM: number;
  offsetM: number;
  lon: number;
  lat: number;
  /** surface to the top of the uppermost duct (m); null when only the trench depth was measured */
  coverM: number | null;
  trenchDepthM: number | null;
  measuredAt: string | null;
  source: DepthSource;
  uploadId: string | null;
  sourceRow: number | null;
  sourceVertex: number | null;
  note: string;
  createdByName: string | null;
  createdAt: string;
  updatedAt: string;
}

export interface DepthReadingValues {
  anchor: PointAnchor;
  coverM: number | null;
  trenchDepthM: number | null;
  measuredAt: string | null;
  source: DepthSource;
  uploadId?: string | null;
  sourceRow?: number | null;
  sourceVertex?: number | null;
  note: string;
}

const columns = (db: Db) => [
  'rec.id', 'rec.project_id', 'rec.route_id', 'r.ref as route_ref', 'r.removed_in_version', 'rec.chainage_m', 'rec.offset_m',
  db.raw('ST_X(rec.geom) as lon'), db.raw('ST_Y(rec.geom) as lat'), 'rec.cover_m', 'rec.trench_depth_m', 'rec.measured_at', 'rec.source',
  'rec.upload_id', 'rec.source_row', 'rec.source_vertex', 'rec.note', 'u.name as created_by_name', 'rec.created_at', 'rec.updated_at',
];

const toDto = (r: Record<string, any>): DepthReading => ({
  id: r.id, projectId: r.project_id, routeId: r.route_id, routeRef: r.route_ref, routeRemoved: r.removed_in_version !== null,
  chainageM: r.chainage_m, offsetM: r.offset_m, lon: r.lon, lat: r.lat, coverM: r.cover_m, trenchDepthM: r.trench_depth_m,
  measuredAt: r.measured_at ? r.measured_at.toISOString() : null, source: r.source, uploadId: r.upload_id, sourceRow: r.source_row,
  sourceVertex: r.source_vertex, note: r.note, createdByName: r.created_by_name ?? null, createdAt: r.created_at.toISOString(), updatedAt: r.updated_at.toISOString(),
});

const base = (db: Db) => db('depth_readings as rec').join('planned_routes as r', 'r.id', 'rec.route_id').leftJoin('users as u', 'u.id', 'rec.created_by');

const rowOf = (db: Db, v: Omit<DepthReadingValues, 'source'>) => ({
  route_id: v.anchor.routeId,
  chainage_m: v.anchor.chainageM,
  offset_m: v.anchor.offsetM,
  geom: db.raw('ST_SetSRID(ST_MakePoint(?, ?), 4326)', [v.anchor.position[0], v.anchor.position[1]]),
  cover_m: v.coverM,
  trench_depth_m: v.trenchDepthM,
  measured_at: v.measuredAt,
  note: v.note,
});

export async function getDepthReading(db: Db, id: string): Promise<DepthReading | undefined> {
  const row = await base(db).where('rec.id', id).first(columns(db));
  return row && toDto(row);
}

/** The project's readings, by route and chainage; `routeId` narrows to one route. */
export async function listDepthReadings(db: Db, projectId: string, routeId?: string): Promise<DepthReading[]> {
  const q = base(db).where('rec.project_id', projectId);
  if (routeId) q.andWhere('rec.route_id', routeId);
  const rows = await q.orderBy([{ column: 'r.ref' }, { column: 'rec.chainage_m' }]).select(columns(db));
  return rows.map(toDto);
}

/** The readings on a section's stretch (ends included), by chainage: for the section page and its depth plot. */
export async function listDepthReadingsOnSection(db: Db, section: { projectId: string; plannedRouteRef: string | null; fromChainageM: number; toChainageM: number }): Promise<DepthReading[]> {
  const rows = await recordsOnSection(db, 'depth_readings', section, 'point').leftJoin('users as u', 'u.id', 'rec.created_by').orderBy('rec.chainage_m').select(columns(db));
  return rows.map(toDto);
}

export async function insertDepthReadings(db: Db, projectId: string, userId: string, values: DepthReadingValues[]): Promise<string[]> {
  const ids: string[] = [];
  for (let i = 0; i < values.length; i += 500) {
    const rows = values.slice(i, i + 500).map((v) => ({
      ...rowOf(db, v), project_id: projectId, source: v.source, upload_id: v.uploadId ?? null, source_row: v.sourceRow ?? null, source_vertex: v.sourceVertex ?? null, created_by: userId, updated_by: userId,
    }));
    const out = await db('depth_readings').insert(rows).returning('id');
    ids.push(...out.map((r: { id: string }) => r.id));
  }
  return ids;
}

export async function updateDepthReading(db: Db, id: string, userId: string, v: Omit<DepthReadingValues, 'source'>): Promise<void> {
  await db('depth_readings').where({ id }).update({ ...rowOf(db, v), updated_by: userId, updated_at: db.fn.now() });
}

export async function deleteDepthReading(db: Db, id: string): Promise<number> {
  return db('depth_readings').where({ id }).delete();
}

export async function countReadingsFromUpload(db: Db, uploadId: string): Promise<number> {
  const [{ n }] = await db('depth_readings').where({ upload_id: uploadId }).count<{ n: string }[]>('* as n');
  return Number(n);
}

/** Route and chainage of every reading of the project, for the "built stretch with no depth reading" check. */
export async function depthReadingChainageRows(db: Db, projectId: string): Promise<{ routeId: string; routeRef: string; chainageM: number }[]> {
  const rows = await db('depth_readings as rec').join('planned_routes as r', 'r.id', 'rec.route_id').where('rec.project_id', projectId).orderBy([{ column: 'r.ref' }, { column: 'rec.chainage_m' }]).select('rec.route_id', 'r.ref', 'rec.chainage_m');
  return rows.map((r) => ({ routeId: r.route_id, routeRef: r.ref, chainageM: r.chainage_m }));
}
