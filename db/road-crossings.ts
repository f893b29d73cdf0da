import type { Db } from './client';
import { recordsOnSection } from './record-anchors';

/** A road crossing's record as the API and the pages see it. */
export interface RoadCrossing {
  id: string;
  projectId: string;
  routeId: string;
  routeRef: string;
  routeRemoved: boolean;
  fromChainageM: number;
  toChainageM: number;
  built: boolean;
  /** YYYY-MM-DD */
  builtOn: string | null;
  /** measured on site (m); null when not measured */
  lengthM: number | null;
  sawnBeforeMain: boolean | null;
  ductCount: number | null;
  ductSizeId: string | null;
  /** "14/10 mm", from the catalogue */
  ductSize: string | null;
  addressRef: string | null;
  note: string;
  photoCount: number;
  createdByName: string | null;
  createdAt: string;
  updatedAt: string;
}

/** A crossing route of the plan with its record, if it has one (none: not built yet). */
export interface CrossingRouteEntry {
  routeId: string;
  routeRef: string;
  street: string | null;
  /** the plan's length of the crossing route (m) */
  plannedLengthM: number;
  /** the plan's duct bundle attribute, e.g. "1x14mm" */
  plannedDucts: string | null;
  routeRemoved: boolean;
  crossing: RoadCrossing | null;
}

export interface RoadCrossingValues {
  fromChainageM: number;
  toChainageM: number;
  built: boolean;
  builtOn: string | null;
  lengthM: number | null;
  sawnBeforeMain: boolean | null;
  ductCount: number | null;
  ductSizeId: string | null;
  addressRef: string | null;
  note: string;
}

const columns = (db: Db) => [
  'rec.id', 'rec.project_id', 'rec.route_id', 'r.ref as route_ref', 'r.removed_in_version', 'rec.from_chainage_m', 'rec.to_chainage_m',
  'rec.built', db.raw("to_char(rec.built_on, 'YYYY-MM-DD') as built_on"), 'rec.length_m', 'rec.sawn_before_main', 'rec.duct_count',
  'rec.duct_size_id', 'ds.outer_mm', 'ds.inner_mm', 'rec.address_ref', 'rec.note', 'u.name as created_by_name', 'rec.created_at', 'rec.updated_at',
  db.raw('(select count(*) from photos p where p.crossing_id = rec.id)::int as photo_count'),
];

const mm = (v: number) => String(Number(v.toFixed(2)));

const toDto = (r: Record<string, any>): RoadCrossing => ({
  id: r.id, projectId: r.project_id, routeId: r.route_id, routeRef: r.route_ref, routeRemoved: r.removed_in_version !== null,
  fromChainageM: r.from_chainage_m, toChainageM: r.to_chainage_m, built: r.built, builtOn: r.built_on ?? null, lengthM: r.length_m,
  sawnBeforeMain: r.sawn_before_main, ductCount: r.duct_count, ductSizeId: r.duct_size_id,
  ductSize: r.outer_mm == null ? null : `${mm(r.outer_mm)}/${mm(r.inner_mm)} mm`, addressRef: r.address_ref, note: r.note,
  photoCount: r.photo_count ?? 0, createdByName: r.created_by_name ?? null, createdAt: r.created_at.toISOString(), updatedAt: r.updated_at.toISOString(),
});

const withJoins = <Q extends ReturnType<Db>>(q: Q) =>
  q.join('planned_routes as r', 'r.id', 'rec.route_id').leftJoin('duct_sizes as ds', 'ds.id', 'rec.duct_size_id').leftJoin('users as u', 'u.id', 'rec.created_by');

const rowOf = (v: RoadCrossingValues) => ({
  from_chainage_m: v.fromChainageM,
  to_chainage_m: v.toChainageM,
  built: v.built,
  built_on: v.builtOn,
  length_m: v.lengthM,
  sawn_before_main: v.sawnBeforeMain,
  duct_count: v.ductCount,
  duct_size_id: v.ductSizeId,
  address_ref: v.addressRef,
  note: v.note,
});

export async function getRoadCrossing(db: Db, id: string): Promise<RoadCrossing | undefined> {
  const row = await withJoins(db('road_crossings as rec')).where('rec.id', id).first(columns(db));
  return row && toDto(row);
}

export async function getRoadCrossingByRoute(db: Db, routeId: string): Promise<RoadCrossing | undefined> {
  const row = await withJoins(db('road_crossings as rec')).where('rec.route_id', routeId).first(columns(db));
  return row && toDto(row);
}

/** The project's crossing records, by route reference. */
export async function listRoadCrossings(db: Db, projectId: string): Promise<RoadCrossing[]> {
  const rows = await withJoins(db('road_crossings as rec')).where('rec.project_id', projectId).orderBy('r.ref').select(columns(db));
  return rows.map(toDto);
}

/**
 * Every crossing route of the plan (current ones, and removed ones that still carry a record), each with
 * its record or null: a crossing route without a record is not built yet.
 */
export async function listCrossingRoutes(db: Db, projectId: string): Promise<CrossingRouteEntry[]> {
  const routes = await db('planned_routes')
    .where({ project_id: projectId, kind: 'crossing' })
    .andWhere((q) => q.whereNull('removed_in_version').orWhereExists(db('road_crossings as c').whereRaw('c.route_id = planned_routes.id')))
    .orderBy('ref')
    .select('id', 'ref', 'street', 'length_m', 'ducts', 'removed_in_version');
  const records = new Map((await listRoadCrossings(db, projectId)).map((c) => [c.routeId, c]));
  return routes.map((r) => ({
    routeId: r.id, routeRef: r.ref, street: r.street, plannedLengthM: r.length_m, plannedDucts: r.ducts ?? null,
    routeRemoved: r.removed_in_version !== null, crossing: records.get(r.id) ?? null,
  }));
}

export async function insertRoadCrossing(db: Db, projectId: string, routeId: string, v: RoadCrossingValues, userId: string): Promise<string> {
  const [row] = await db('road_crossings')
    .insert({ project_id: projectId, route_id: routeId, ...rowOf(v), created_by: userId, updated_by: userId })
    .returning('id');
  return row.id;
}

export async function updateRoadCrossing(db: Db, id: string, v: RoadCrossingValues, userId: string): Promise<void> {
  await db('road_crossings').where({ id }).update({ ...rowOf(v), updated_by: userId, updated_at: db.fn.now() });
}

export async function deleteRoadCrossing(db: Db, id: string): Promise<void> {
  await db('road_crossings').where({ id }).delete();
}

/** The crossings whose stretch touches a section's (a crossing's section is its crossing route's). */
export async function listRoadCrossingsOnSection(db: Db, section: { projectId: string; plannedRouteRef: string | null; fromChainageM: number; toChainageM: number }): Promise<RoadCrossing[]> {
  const q = recordsOnSection(db, 'road_crossings', section, 'stretch');
  const rows = await q
    .leftJoin('duct_sizes as ds', 'ds.id', 'rec.duct_size_id')
    .leftJoin('users as u', 'u.id', 'rec.created_by')
    .orderBy('rec.from_chainage_m')
    .select(columns(db));
  return rows.map(toDto);
}
