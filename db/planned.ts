import type { Db } from './client';
import type { LonLat, PlannedRouteInput, RouteKind } from '@/lib/matching/types';

export interface PlannedRoute extends PlannedRouteInput {
  id: string;
  lengthM: number;
  firstVersion: number;
  geometryVersion: number;
  removedInVersion: number | null;
}

export interface PlanVersion {
  id: string;
  version: number;
  fileName: string;
  sha256: string;
  format: string;
  crs: string;
  mapping: Record<string, string>;
  mappingGuessed: boolean;
  changes: Record<string, string[]>;
  diagnostics: { kind: string; refs: string[]; position: LonLat; message: string }[];
  warnings: string[];
  routeCount: number;
  lengthM: number;
  importedByName: string | null;
  createdAt: string;
}

interface RouteRow {
  id: string;
  ref: string;
  street: string | null;
  ducts: string | null;
  kind: RouteKind;
  geometry: { coordinates: LonLat[] };
  length_m: number;
  first_version: number;
  geometry_version: number;
  removed_in_version: number | null;
}

const toRoute = (r: RouteRow): PlannedRoute => ({
  id: r.id,
  ref: r.ref,
  street: r.street,
  ducts: r.ducts,
  kind: r.kind,
  coords: r.geometry.coordinates,
  lengthM: r.length_m,
  firstVersion: r.first_version,
  geometryVersion: r.geometry_version,
  removedInVersion: r.removed_in_version,
});

/** Routes of the project, current ones first; `includeRemoved` adds those a revision dropped. */
export async function listPlannedRoutes(db: Db, projectId: string, includeRemoved = false): Promise<PlannedRoute[]> {
  const q = db('planned_routes')
    .where({ project_id: projectId })
    .select('id', 'ref', 'street', 'ducts', 'kind', 'length_m', 'first_version', 'geometry_version', 'removed_in_version', db.raw('ST_AsGeoJSON(geom, 9)::json as geometry'))
    .orderByRaw('removed_in_version is not null, ref');
  if (!includeRemoved) q.whereNull('removed_in_version');
  return ((await q) as RouteRow[]).map(toRoute);
}

const lineWkt = (coords: LonLat[]) => `LINESTRING(${coords.map((c) => `${c[0]} ${c[1]}`).join(',')})`;

export async function insertPlannedRoute(db: Db, projectId: string, r: PlannedRouteInput & { lengthM: number }, version: number): Promise<string> {
  const [{ id }] = await db('planned_routes')
    .insert({ project_id: projectId, ref: r.ref, street: r.street, ducts: r.ducts, kind: r.kind, geom: db.raw('ST_GeomFromText(?, 4326)', [lineWkt(r.coords)]), length_m: r.lengthM, first_version: version, geometry_version: version })
    .returning('id');
  return id;
}

export async function updatePlannedRoute(
  db: Db,
  id: string,
  patch: { street?: string | null; ducts?: string | null; kind?: RouteKind; coords?: LonLat[]; lengthM?: number; geometryVersion?: number; removedInVersion?: number | null },
): Promise<void> {
  const v: Record<string, unknown> = { updated_at: db.fn.now() };
  if (patch.street !== undefined) v.street = patch.street;
  if (patch.ducts !== undefined) v.ducts = patch.ducts;
  if (patch.kind !== undefined) v.kind = patch.kind;
  if (patch.coords !== undefined) v.geom = db.raw('ST_GeomFromText(?, 4326)', [lineWkt(patch.coords)]);
  if (patch.lengthM !== undefined) v.length_m = patch.lengthM;
  if (patch.geometryVersion !== undefined) v.geometry_version = patch.geometryVersion;
  if (patch.removedInVersion !== undefined) v.removed_in_version = patch.removedInVersion;
  await db('planned_routes').where({ id }).update(v);
}

export async function insertRouteHistory(db: Db, routeId: string, version: number, change: string, r: PlannedRouteInput): Promise<void> {
  await db('planned_route_history').insert({ route_id: routeId, version, change, geom: db.raw('ST_GeomFromText(?, 4326)', [lineWkt(r.coords)]), street: r.street, ducts: r.ducts, kind: r.kind });
}

/** Takes the project's plan lock for the caller's transaction: versions are numbered one import at a time. */
export async function lockProjectPlan(db: Db, projectId: string): Promise<number> {
  // NO KEY UPDATE: serialises runs without blocking uploads, whose foreign-key checks take KEY SHARE on the project
  await db('projects').where({ id: projectId }).forNoKeyUpdate().first('id');
  const row = await db('plan_versions').where({ project_id: projectId }).max<{ max: number | null }[]>('version as max');
  return (row[0]?.max ?? 0) + 1;
}

export async function insertPlanVersion(
  db: Db,
  v: Omit<PlanVersion, 'importedByName' | 'createdAt'> & { projectId: string; importedBy: string },
): Promise<string> {
  const [{ id }] = await db('plan_versions')
    .insert({
      id: v.id, project_id: v.projectId, version: v.version, file_name: v.fileName, sha256: v.sha256, format: v.format, crs: v.crs,
      mapping: JSON.stringify(v.mapping), mapping_guessed: v.mappingGuessed, changes: JSON.stringify(v.changes),
      diagnostics: JSON.stringify(v.diagnostics), warnings: JSON.stringify(v.warnings), route_count: v.routeCount, length_m: v.lengthM, imported_by: v.importedBy,
    })
    .returning('id');
  return id;
}

export async function insertPlanVersionFiles(db: Db, versionId: string, files: { fileName: string; storageKey: string; sha256: string; sizeBytes: number }[]): Promise<void> {
  await db('plan_version_files').insert(files.map((f) => ({ plan_version_id: versionId, file_name: f.fileName, storage_key: f.storageKey, sha256: f.sha256, size_bytes: f.sizeBytes })));
}

export async function listPlanVersions(db: Db, projectId: string): Promise<PlanVersion[]> {
  const rows = await db('plan_versions as v').leftJoin('users as u', 'u.id', 'v.imported_by').where('v.project_id', projectId).orderBy('v.version', 'desc').select('v.*', 'u.name as imported_by_name');
  return rows.map((r) => ({
    id: r.id, version: r.version, fileName: r.file_name, sha256: r.sha256, format: r.format, crs: r.crs, mapping: r.mapping, mappingGuessed: r.mapping_guessed,
    changes: r.changes, diagnostics: r.diagnostics, warnings: r.warnings, routeCount: r.route_count, lengthM: r.length_m, importedByName: r.imported_by_name, createdAt: r.created_at.toISOString(),
  }));
}

export async function findPlanVersionBySha(db: Db, projectId: string, sha256: string): Promise<PlanVersion | undefined> {
  return (await listPlanVersions(db, projectId)).find((v) => v.sha256 === sha256);
}

/** The project's extent becomes the planned network's bounding box, with a margin of about 50 m. */
export async function deriveExtentFromPlan(db: Db, projectId: string): Promise<void> {
  await db.raw(
    `update projects set extent = (select ST_Envelope(ST_Expand(ST_Extent(geom)::geometry, 0.0005)) from planned_routes where project_id = ? and removed_in_version is null), updated_at = now() where id = ?`,
    [projectId, projectId],
  );
}

export async function hasCurrentPlan(db: Db, projectId: string): Promise<boolean> {
  return (await db('planned_routes').where({ project_id: projectId }).whereNull('removed_in_version').first('id')) !== undefined;
}
