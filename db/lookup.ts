import type { Db } from './client';
import type { LonLat } from '@/lib/matching/types';
import type { AccuracyClass } from '@/lib/records/accuracy-classes';

/** A current as-built section near a spot, as the lookup reads it. */
export interface NearbySectionRow {
  id: string;
  projectId: string;
  routeRef: string | null;
  status: string;
  fromChainageM: number;
  toChainageM: number;
  /** the 95 % horizontal radius of the recorded line (m), R95_FACTOR × σ; null where nothing measured it */
  accuracyM: number | null;
  laidOn: string | null;
  review: string;
  sourceUploadIds: string[];
  /** geodesic distance from the spot to the line (m, PostGIS on the WGS 84 spheroid) */
  distanceM: number;
  coords: LonLat[];
  /** the 95 % band around the line: a geodesic buffer of accuracyM (PostGIS geography buffer) */
  band: GeoJSON.Polygon | GeoJSON.MultiPolygon | null;
}

/** How many nearest sections the index walk (KNN) hands on to the exact distance filter. */
export const NEARBY_CANDIDATES = 100;

/**
 * The nearby query itself (positional `?`: lon, lat, project ids, radius in metres). Exported so that the
 * lookup benchmark's bare server (scripts/bench-lookup.ts) runs exactly this statement as its ceiling.
 */
export const NEARBY_SECTIONS_SQL = `SELECT c.id, c.project_id, c.planned_route_ref, c.status, c.from_chainage_m, c.to_chainage_m, c.accuracy_m,
            to_char(c.laid_on, 'YYYY-MM-DD') AS laid_on, c.review, c.source_upload_ids,
            ST_Distance(c.geom::geography, spot.g::geography) AS distance_m,
            ST_AsGeoJSON(c.geom, 9)::json AS geometry,
            CASE WHEN c.accuracy_m > 0 THEN ST_AsGeoJSON(ST_Buffer(c.geom::geography, c.accuracy_m)::geometry, 9)::json END AS band
       FROM (SELECT ST_SetSRID(ST_MakePoint(?, ?), 4326) AS g) spot
      CROSS JOIN LATERAL (SELECT s.* FROM sections s
              WHERE s.project_id = ANY(?::uuid[]) AND s.retired_in_run IS NULL AND s.status <> 'not_built'
              ORDER BY s.geom <-> spot.g LIMIT ${NEARBY_CANDIDATES}) c
      WHERE ST_DWithin(c.geom::geography, spot.g::geography, ?)
      ORDER BY distance_m, c.id`;

/**
 * The current built sections (not retired, not `not_built`) of the given projects within `radiusM` of the
 * spot, nearest first: the GIST index walks the sections in planar distance order (`<->`), the nearest
 * NEARBY_CANDIDATES of them are measured geodesically and kept within the radius. The spot is a one-row
 * subquery joined LATERAL, not a CTE: a CTE used twice is materialised, and the KNN order then ran as a
 * sequential scan and sort of every visible section (174 ms against 0.7 ms on the benchmark's 50,000).
 */
export async function nearbySections(db: Db, projectIds: string[], p: LonLat, radiusM: number): Promise<NearbySectionRow[]> {
  if (projectIds.length === 0) return [];
  const { rows } = await db.raw(
    NEARBY_SECTIONS_SQL,
    [p[0], p[1], projectIds, radiusM],
  );
  return rows.map((r: Record<string, any>) => ({
    id: r.id, projectId: r.project_id, routeRef: r.planned_route_ref, status: r.status, fromChainageM: r.from_chainage_m, toChainageM: r.to_chainage_m,
    accuracyM: r.accuracy_m, laidOn: r.laid_on, review: r.review, sourceUploadIds: r.source_upload_ids ?? [], distanceM: Number(r.distance_m),
    coords: r.geometry.coordinates, band: r.band ?? null,
  }));
}

export interface LookupRoute {
  id: string;
  projectId: string;
  ref: string;
  street: string | null;
  coords: LonLat[];
}

export async function routesByRef(db: Db, keys: { projectId: string; ref: string }[]): Promise<LookupRoute[]> {
  if (keys.length === 0) return [];
  const rows = await db('planned_routes')
    .whereIn(['project_id', 'ref'], keys.map((k) => [k.projectId, k.ref]))
    .select('id', 'project_id', 'ref', 'street', db.raw('ST_AsGeoJSON(geom, 9)::json as geometry'));
  return rows.map((r) => ({ id: r.id, projectId: r.project_id, ref: r.ref, street: r.street, coords: r.geometry.coordinates }));
}

export interface DepthOnRoute {
  routeId: string;
  chainageM: number;
  coverM: number;
  measuredAt: string | null;
}

/** Cover readings on the routes (only those with a cover). */
export async function coverReadings(db: Db, routes: { projectId: string; id: string }[]): Promise<DepthOnRoute[]> {
  if (routes.length === 0) return [];
  // by (project, route): the readings' index leads with the project
  const rows = await db('depth_readings').whereIn(['project_id', 'route_id'], routes.map((r) => [r.projectId, r.id])).whereNotNull('cover_m').orderBy(['route_id', 'chainage_m']).select('route_id', 'chainage_m', 'cover_m', 'measured_at');
  return rows.map((r) => ({ routeId: r.route_id, chainageM: r.chainage_m, coverM: r.cover_m, measuredAt: r.measured_at?.toISOString() ?? null }));
}

export async function uploadClasses(db: Db, ids: string[]): Promise<Map<string, { accuracyClass: AccuracyClass; sigmaM: number | null }>> {
  if (ids.length === 0) return new Map();
  const rows = await db('uploads').whereIn('id', ids).select('id', 'accuracy_class', 'sigma_m');
  return new Map(rows.map((r) => [r.id, { accuracyClass: r.accuracy_class, sigmaM: r.sigma_m }]));
}

export interface NearbyPoint {
  kind: 'utility' | 'pit';
  id: string;
  projectId: string;
  lon: number;
  lat: number;
  distanceM: number;
  label: string;
  depthM: number | null;
  clearanceM: number | null;
  owner: string;
}

/**
 * Half the side of a box in degrees that holds every point within `radiusM` of p: the metres of a degree of
 * longitude shrink with cos(latitude), and a degree of latitude is never shorter than one of longitude at the
 * equator (110,574 m against 111,320 m), so the longitude figure bounds both. The box lets the GIST index
 * find the candidates before the geodesic ST_DWithin measures them.
 */
export const boxDegrees = (p: LonLat, radiusM: number) => Math.min(180, (radiusM / (110_574 * Math.max(Math.cos((p[1] * Math.PI) / 180), 0.01))) * 1.01);

/** Utility crossings and test pits of the projects within the radius, nearest first (geodesic). */
export async function nearbyPoints(db: Db, projectIds: string[], p: LonLat, radiusM: number): Promise<NearbyPoint[]> {
  if (projectIds.length === 0) return [];
  const { rows } = await db.raw(
    `WITH spot AS (SELECT ST_SetSRID(ST_MakePoint(?, ?), 4326)::geography AS g)
     SELECT 'utility' AS kind, u.id, u.project_id, ST_X(u.geom) AS lon, ST_Y(u.geom) AS lat, ST_Distance(u.geom::geography, spot.g) AS distance_m,
            k.label, u.depth_m, u.clearance_m, u.owner
       FROM utility_crossings u JOIN utility_kinds k ON k.id = u.utility_kind_id, spot
      WHERE u.project_id = ANY(?::uuid[]) AND u.geom && ST_Expand(spot.g::geometry, ?) AND ST_DWithin(u.geom::geography, spot.g, ?)
     UNION ALL
     SELECT 'pit', t.id, t.project_id, ST_X(t.geom), ST_Y(t.geom), ST_Distance(t.geom::geography, spot.g), 'Test pit ' || t.name, t.depth_m, NULL, ''
       FROM test_pits t, spot
      WHERE t.project_id = ANY(?::uuid[]) AND t.geom && ST_Expand(spot.g::geometry, ?) AND ST_DWithin(t.geom::geography, spot.g, ?)
      ORDER BY distance_m`,
    [p[0], p[1], projectIds, boxDegrees(p, radiusM), radiusM, projectIds, boxDegrees(p, radiusM), radiusM],
  );
  return rows.map((r: Record<string, any>) => ({ kind: r.kind, id: r.id, projectId: r.project_id, lon: r.lon, lat: r.lat, distanceM: Number(r.distance_m), label: r.label, depthM: r.depth_m, clearanceM: r.clearance_m, owner: r.owner }));
}

/** Road crossing records of the routes, for the map and the list. */
export async function crossingsOn(db: Db, projectIds: string[], p: LonLat, radiusM: number): Promise<{ id: string; projectId: string; routeRef: string; built: boolean; coords: LonLat[] }[]> {
  if (projectIds.length === 0) return [];
  const { rows } = await db.raw(
    `SELECT c.id, c.project_id, r.ref, c.built, ST_AsGeoJSON(r.geom, 9)::json AS geometry
       FROM road_crossings c JOIN planned_routes r ON r.id = c.route_id
      WHERE c.project_id = ANY(?::uuid[]) AND r.geom && ST_Expand(ST_SetSRID(ST_MakePoint(?, ?), 4326), ?)
        AND ST_DWithin(r.geom::geography, ST_SetSRID(ST_MakePoint(?, ?), 4326)::geography, ?)`,
    [projectIds, p[0], p[1], boxDegrees(p, radiusM), p[0], p[1], radiusM],
  );
  return rows.map((r: Record<string, any>) => ({ id: r.id, projectId: r.project_id, routeRef: r.ref, built: r.built, coords: r.geometry.coordinates }));
}

/** The organisations' contacts (free text, empty when not set). */
export async function ownerContacts(db: Db, orgIds: string[]): Promise<Map<string, string>> {
  if (orgIds.length === 0) return new Map();
  const rows = await db('organisations').whereIn('id', orgIds).select('id', 'contact');
  return new Map(rows.map((r) => [r.id, r.contact]));
}

/**
 * For each section, the newest issued package (issued, accepted or returned) whose snapshot holds it: the
 * handover revision a crew can ask the owner for. A section re-derived since then has a new id and is not
 * in any package yet.
 */
export async function handedOverIn(db: Db, projectIds: string[], sectionIds: string[]): Promise<Map<string, { handoverId: string; revision: number; status: string }>> {
  if (projectIds.length === 0 || sectionIds.length === 0) return new Map();
  const { rows } = await db.raw(
    `SELECT DISTINCT ON (e->>'id') e->>'id' AS section_id, h.id, h.revision, h.status
       FROM handovers h
      CROSS JOIN LATERAL jsonb_array_elements(CASE WHEN jsonb_typeof(h.snapshot->'sections') = 'array' THEN h.snapshot->'sections' ELSE '[]'::jsonb END) e
      WHERE h.project_id = ANY(?::uuid[]) AND h.status IN ('issued', 'accepted', 'returned') AND e->>'id' = ANY(?::text[])
      ORDER BY e->>'id', h.revision DESC`,
    [projectIds, sectionIds],
  );
  return new Map(rows.map((r: Record<string, any>) => [r.section_id, { handoverId: r.id, revision: r.revision, status: r.status }]));
}
