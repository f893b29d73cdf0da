import type { Db } from './client';
import type { LonLat } from '@/lib/matching/types';

/** A route a record can hang on, with whether a plan revision removed it (its records stay, flagged). */
export interface AnchorRoute {
  id: string;
  ref: string;
  street: string | null;
  kind: 'street' | 'crossing';
  lengthM: number;
  removed: boolean;
  coords: LonLat[];
}

const toRoute = (r: { id: string; ref: string; street: string | null; kind: 'street' | 'crossing'; length_m: number; removed_in_version: number | null; geometry: { coordinates: LonLat[] } }): AnchorRoute => ({
  id: r.id, ref: r.ref, street: r.street, kind: r.kind, lengthM: r.length_m, removed: r.removed_in_version !== null, coords: r.geometry.coordinates,
});

const routeColumns = (db: Db) => ['id', 'ref', 'street', 'kind', 'length_m', 'removed_in_version', db.raw('ST_AsGeoJSON(geom, 9)::json as geometry')];

/** The route if it belongs to the project (removed ones included). */
export async function getAnchorRoute(db: Db, projectId: string, routeId: string): Promise<AnchorRoute | undefined> {
  const r = await db('planned_routes').where({ id: routeId, project_id: projectId }).first(routeColumns(db));
  return r && toRoute(r);
}

/** The route of a section (by its planned route reference) in its project. */
export async function getRouteByRef(db: Db, projectId: string, ref: string): Promise<AnchorRoute | undefined> {
  const r = await db('planned_routes').where({ ref, project_id: projectId }).first(routeColumns(db));
  return r && toRoute(r);
}

/** The project's routes that records may be added to: current ones (removed routes keep theirs, read-only). */
export async function listAnchorRoutes(db: Db, projectId: string): Promise<Omit<AnchorRoute, 'coords'>[]> {
  const rows = await db('planned_routes').where({ project_id: projectId }).orderBy('ref').select('id', 'ref', 'street', 'kind', 'length_m', 'removed_in_version');
  return rows.map((r) => ({ id: r.id, ref: r.ref, street: r.street, kind: r.kind, lengthM: r.length_m, removed: r.removed_in_version !== null }));
}

/** The five current routes of the project nearest to p (PostGIS's index order, planar: refine exactly after). */
export async function nearestRoutes(db: Db, projectId: string, p: LonLat): Promise<AnchorRoute[]> {
  const rows = await db('planned_routes')
    .where({ project_id: projectId })
    .whereNull('removed_in_version')
    .orderByRaw('geom <-> ST_SetSRID(ST_MakePoint(?, ?), 4326)', p)
    .limit(5)
    .select(routeColumns(db));
  return rows.map(toRoute);
}

/** The current sections (not retired) whose stretch a record's range touches; a point gives from = to. */
export async function sectionsOnStretch(db: Db, projectId: string, routeId: string, fromM: number, toM: number): Promise<{ id: string; fromChainageM: number; toChainageM: number; status: string; review: string }[]> {
  const rows = await db('sections as s')
    .join('planned_routes as r', function () {
      this.on('r.ref', '=', 's.planned_route_ref').andOn('r.project_id', '=', 's.project_id');
    })
    .where({ 's.project_id': projectId, 'r.id': routeId })
    .whereNull('s.retired_in_run')
    .andWhere((q) => {
      if (fromM === toM) q.where('s.from_chainage_m', '<=', fromM).andWhere('s.to_chainage_m', '>=', toM);
      else q.where('s.from_chainage_m', '<', toM).andWhere('s.to_chainage_m', '>', fromM);
    })
    .orderBy('s.from_chainage_m')
    .select('s.id', 's.from_chainage_m', 's.to_chainage_m', 's.status', 's.review');
  return rows.map((r) => ({ id: r.id, fromChainageM: r.from_chainage_m, toChainageM: r.to_chainage_m, status: r.status, review: r.review }));
}

/**
 * The stretch a section covers, as a record filter: records of `table` (with route_id and either
 * from/to_chainage_m or chainage_m) on the section's route whose range touches the section's.
 * `recordsOnSection(db, 'duct_bundles', section, 'stretch')`.
 */
export function recordsOnSection(db: Db, table: string, section: { projectId: string; plannedRouteRef: string | null; fromChainageM: number; toChainageM: number }, shape: 'stretch' | 'point') {
  const q = db(`${table} as rec`)
    .join('planned_routes as r', 'r.id', 'rec.route_id')
    .where('rec.project_id', section.projectId)
    // the route by (project, ref), its unique index: without the project the planner scanned every route
    .andWhere('r.project_id', section.projectId)
    .andWhere((w) => (section.plannedRouteRef === null ? w.whereRaw('false') : w.where('r.ref', section.plannedRouteRef)));
  if (shape === 'stretch') q.andWhere('rec.from_chainage_m', '<', section.toChainageM).andWhere('rec.to_chainage_m', '>', section.fromChainageM);
  else q.andWhere('rec.chainage_m', '>=', section.fromChainageM).andWhere('rec.chainage_m', '<=', section.toChainageM);
  return q;
}
