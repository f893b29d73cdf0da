import type { Knex } from 'knex';
import type { Db } from './client';
import type { LonLat } from '@/lib/matching/types';
import type { AccuracyClass } from '@/lib/records/accuracy-classes';
import { toDuct, type Duct } from './duct-bundles';
import type { DuctBundleDuctRow } from './tables';

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
 * The nearby query itself (positional `?`: lon, lat, project ids, radius in metres): the current built
 * sections (not retired, not `not_built`) of the given projects within the radius of the spot, nearest first.
 * The GIST index walks the sections in planar distance order (`<->`), the nearest NEARBY_CANDIDATES of them
 * are measured geodesically and kept within the radius. The spot is a one-row subquery joined LATERAL, not a
 * CTE: a CTE used twice is materialised, and the KNN order then ran as a sequential scan and sort of every
 * visible section (174 ms against 0.7 ms on the benchmark's 50,000). Exported so that the lookup benchmark's
 * bare server (scripts/bench-lookup.ts) runs exactly this statement as its ceiling.
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

const nearbyRow = (r: Record<string, any>): NearbySectionRow => ({
  id: r.id, projectId: r.project_id, routeRef: r.planned_route_ref, status: r.status, fromChainageM: r.from_chainage_m, toChainageM: r.to_chainage_m,
  accuracyM: r.accuracy_m, laidOn: r.laid_on, review: r.review, sourceUploadIds: r.source_upload_ids ?? [], distanceM: Number(r.distance_m),
  coords: r.geometry.coordinates, band: r.band ?? null,
});


/** A nearby section with everything the lookup says about it, read in two statements. */
export interface LookupStretchRow extends NearbySectionRow {
  route: { id: string; street: string | null; coords: LonLat[] } | null;
  ownerContact: string;
  /** cover readings on the section's stretch of its route, by chainage */
  covers: { chainageM: number; coverM: number }[];
  /** the bundles on the stretch (planned and installed), by chainage, with their ducts */
  bundles: { kind: 'planned' | 'installed'; ducts: Duct[] }[];
  /** the accuracy classes of the uploads the section was derived from */
  classes: AccuracyClass[];
  /** the newest issued handover package holding the section; null: not handed over yet */
  handover: { handoverId: string; revision: number; status: string } | null;
}

/**
 * What the lookup says about each section beyond its line, by section id: route, owner's contact, cover
 * readings on the stretch, bundles with their ducts, source classes and handover revision, each a correlated
 * subquery on its index. `$1` is the section ids. It runs as a NAMED prepared statement (`namedQuery`), the
 * one exception to the rule that queries go unnamed: bench:lookup showed planning at most of its cost, and
 * its generic plan can only be primary-key and index lookups (a test EXPLAINs it). The nearby query itself
 * stays unnamed: its generic plan dropped the KNN walk on a small table. Pattern and trigram queries must
 * never be named either.
 */
export const SECTION_DETAILS_SQL = `SELECT s.id, r.id AS route_id, r.street, ST_AsGeoJSON(r.geom, 9)::json AS route_geometry,
            (SELECT o.contact FROM projects pr JOIN organisations o ON o.id = pr.owner_org_id WHERE pr.id = s.project_id) AS owner_contact,
            (SELECT coalesce(json_agg(json_build_object('chainageM', d.chainage_m, 'coverM', d.cover_m) ORDER BY d.chainage_m), '[]'::json)
               FROM depth_readings d
              WHERE d.project_id = s.project_id AND d.route_id = r.id AND d.cover_m IS NOT NULL AND d.chainage_m BETWEEN s.from_chainage_m AND s.to_chainage_m) AS covers,
            (SELECT coalesce(json_agg(json_build_object('kind', b.kind,
                      'ducts', (SELECT coalesce(json_agg(row_to_json(dd) ORDER BY dd.position), '[]'::json) FROM duct_bundle_ducts dd WHERE dd.bundle_id = b.id))
                    ORDER BY b.from_chainage_m, b.kind DESC), '[]'::json)
               FROM duct_bundles b
              WHERE b.project_id = s.project_id AND b.route_id = r.id AND b.from_chainage_m < s.to_chainage_m AND b.to_chainage_m > s.from_chainage_m) AS bundles,
            (SELECT coalesce(array_agg(DISTINCT u.accuracy_class), '{}') FROM uploads u WHERE u.id = ANY(s.source_upload_ids)) AS classes,
            (SELECT json_build_object('handoverId', h.id, 'revision', h.revision, 'status', h.status)
               FROM handovers h
              WHERE h.project_id = s.project_id AND h.status IN ('issued', 'accepted', 'returned')
                AND h.snapshot->'sections' @> jsonb_build_array(jsonb_build_object('id', s.id::text))
              ORDER BY h.revision DESC LIMIT 1) AS handover
       FROM sections s
       LEFT JOIN planned_routes r ON r.project_id = s.project_id AND r.ref = s.planned_route_ref
      WHERE s.id = ANY($1::uuid[])`;

/** A named prepared statement on a connection of knex's pool: PostgreSQL plans it once per connection. */
async function namedQuery(db: Db, name: string, text: string, values: unknown[]): Promise<{ rows: Record<string, any>[] }> {
  const client = (db as Knex).client;
  const conn = await client.acquireConnection();
  try {
    return await conn.query({ name, text, values });
  } finally {
    await client.releaseConnection(conn);
  }
}

/** The nearby sections (NEARBY_SECTIONS_SQL, unnamed) with what the lookup says about each (SECTION_DETAILS_SQL). */
export async function lookupStretches(db: Db, projectIds: string[], p: LonLat, radiusM: number): Promise<LookupStretchRow[]> {
  if (projectIds.length === 0) return [];
  const { rows: near } = await db.raw(NEARBY_SECTIONS_SQL, [p[0], p[1], projectIds, radiusM]);
  if (near.length === 0) return [];
  const { rows } = await namedQuery(db, 'lookup_section_details', SECTION_DETAILS_SQL, [near.map((n: { id: string }) => n.id)]);
  const details = new Map(rows.map((r) => [r.id as string, r]));
  return near.map((n: Record<string, any>) => {
    const r = details.get(n.id)!;
    return {
      ...nearbyRow(n),
      route: r.route_id ? { id: r.route_id, street: r.street, coords: r.route_geometry.coordinates } : null,
      ownerContact: r.owner_contact ?? '',
      covers: r.covers,
      bundles: r.bundles.map((b: { kind: 'planned' | 'installed'; ducts: DuctBundleDuctRow[] }) => ({ kind: b.kind, ducts: b.ducts.map(toDuct) })),
      classes: r.classes ?? [],
      handover: r.handover ?? null,
    };
  });
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

/**
 * Utility crossings and test pits within the radius, and the road crossing records whose route passes within
 * it: one statement, each part found through its GIST index by a box (`boxDegrees`) before the geodesic test.
 * `$1` lon, `$2` lat, `$3` project ids, `$4` the box's half side in degrees, `$5` the radius in metres. Named
 * and prepared like SECTION_DETAILS_SQL: its planning (1.4 ms) was four times its execution; its generic plan
 * keeps the box on the indexes (a test EXPLAINs it).
 */
export const POINTS_AND_CROSSINGS_SQL = `SELECT 'utility' AS kind, u.id, u.project_id, ST_X(u.geom) AS lon, ST_Y(u.geom) AS lat,
            ST_Distance(u.geom::geography, ST_SetSRID(ST_MakePoint($1, $2), 4326)::geography) AS distance_m,
            k.label, u.depth_m, u.clearance_m, u.owner, NULL::text AS route_ref, NULL::boolean AS built, NULL::json AS geometry
       FROM utility_crossings u JOIN utility_kinds k ON k.id = u.utility_kind_id
      WHERE u.project_id = ANY($3::uuid[]) AND u.geom && ST_Expand(ST_SetSRID(ST_MakePoint($1, $2), 4326), $4)
        AND ST_DWithin(u.geom::geography, ST_SetSRID(ST_MakePoint($1, $2), 4326)::geography, $5)
     UNION ALL
     SELECT 'pit', t.id, t.project_id, ST_X(t.geom), ST_Y(t.geom), ST_Distance(t.geom::geography, ST_SetSRID(ST_MakePoint($1, $2), 4326)::geography),
            'Test pit ' || t.name, t.depth_m, NULL, '', NULL, NULL, NULL
       FROM test_pits t
      WHERE t.project_id = ANY($3::uuid[]) AND t.geom && ST_Expand(ST_SetSRID(ST_MakePoint($1, $2), 4326), $4)
        AND ST_DWithin(t.geom::geography, ST_SetSRID(ST_MakePoint($1, $2), 4326)::geography, $5)
     UNION ALL
     SELECT 'crossing', c.id, c.project_id, NULL, NULL, ST_Distance(r.geom::geography, ST_SetSRID(ST_MakePoint($1, $2), 4326)::geography),
            NULL, NULL, NULL, '', r.ref, c.built, ST_AsGeoJSON(r.geom, 9)::json
       FROM road_crossings c JOIN planned_routes r ON r.id = c.route_id
      WHERE c.project_id = ANY($3::uuid[]) AND r.geom && ST_Expand(ST_SetSRID(ST_MakePoint($1, $2), 4326), $4)
        AND ST_DWithin(r.geom::geography, ST_SetSRID(ST_MakePoint($1, $2), 4326)::geography, $5)
      ORDER BY distance_m, id`;

export async function nearbyPointsAndCrossings(db: Db, projectIds: string[], p: LonLat, radiusM: number): Promise<{ points: NearbyPoint[]; crossings: { id: string; projectId: string; routeRef: string; built: boolean; coords: LonLat[] }[] }> {
  if (projectIds.length === 0) return { points: [], crossings: [] };
  const { rows } = await namedQuery(db, 'lookup_points_crossings', POINTS_AND_CROSSINGS_SQL, [p[0], p[1], projectIds, boxDegrees(p, radiusM), radiusM]);
  const points: NearbyPoint[] = [];
  const crossings: { id: string; projectId: string; routeRef: string; built: boolean; coords: LonLat[] }[] = [];
  for (const r of rows as Record<string, any>[]) {
    if (r.kind === 'crossing') crossings.push({ id: r.id, projectId: r.project_id, routeRef: r.route_ref, built: r.built, coords: r.geometry.coordinates });
    else points.push({ kind: r.kind, id: r.id, projectId: r.project_id, lon: r.lon, lat: r.lat, distanceM: Number(r.distance_m), label: r.label, depthM: r.depth_m, clearanceM: r.clearance_m, owner: r.owner });
  }
  return { points, crossings };
}
