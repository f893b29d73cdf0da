import type { Db } from './client';
import { SIMPLIFY_BELOW_ZOOM, TILE_BUFFER, TILE_EXTENT, simplifyTolerance, type TileAddress, type TileLayer } from '@/lib/tiles/params';

/**
 * Mapbox Vector Tiles of a project, made by PostGIS (issue 18). Each layer is one `ST_AsMVT` over
 * `ST_AsMVTGeom(ST_Transform(geom, 3857), ST_TileEnvelope(z, x, y), 4096, 64, true)`; the rows are found with
 * `geom && ST_Transform(ST_TileEnvelope(z, x, y, margin => 64/4096), 4326)`, so the table's GIST index on geom
 * is used and a feature in the tile's 64-unit buffer is drawn too. Lines are simplified in EPSG:3857 with a
 * tolerance of one tile unit below zoom 16 (`simplifyTolerance`; collapsed lines are kept, `preserveCollapsed`),
 * then quantised to the 4096 grid by ST_AsMVTGeom. A multi-layer tile is the layers' bytes concatenated, which
 * the MVT format allows (a tile is a repeated `layers` field). A null attribute is left out of the feature, as
 * ST_AsMVT does (a not-built section has no `accuracy_m`). A geometry that ST_AsMVTGeom clips away or collapses
 * on the grid (a 9 m line at zoom 8, where one unit is about 38 m) comes back NULL, and ST_AsMVT skips the row.
 */

interface LayerSql {
  /** FROM and JOINs; the main table's alias is t */
  from: string;
  /** the geometry in EPSG:4326, and the column whose GIST index finds the rows */
  geom: string;
  indexed: string;
  /** the attributes, as `expr AS name` */
  columns: string;
  /** what else a row must satisfy (no values: those are bindings) */
  where: string;
  /** lines are simplified below SIMPLIFY_BELOW_ZOOM; points are not */
  lines: boolean;
}

const LAYERS: Record<TileLayer, LayerSql> = {
  // the current plan: routes a revision removed are left out
  planned_routes: { from: 'planned_routes t', geom: 't.geom', indexed: 't.geom', columns: 't.id::text AS id, t.ref, t.street, t.kind', where: 't.removed_in_version IS NULL', lines: true },
  // current sections only: a stretch a later run retired is not drawn
  sections: { from: 'sections t', geom: 't.geom', indexed: 't.geom', columns: 't.id::text AS id, t.planned_route_ref AS ref, t.status, t.review, t.accuracy_m', where: 't.retired_in_run IS NULL', lines: true },
  // a crossing is a chainage range on its route: the route's line between the fractions (chainage over the
  // route's geodesic length, applied along the line in degrees: within centimetres on a crossing's few metres)
  road_crossings: {
    from: 'road_crossings t JOIN planned_routes r ON r.id = t.route_id',
    geom: 'ST_LineSubstring(r.geom, LEAST(1, GREATEST(0, t.from_chainage_m / NULLIF(r.length_m, 0))), LEAST(1, GREATEST(0, t.to_chainage_m / NULLIF(r.length_m, 0))))',
    indexed: 'r.geom',
    columns: 't.id::text AS id, r.ref, t.built',
    where: 'r.length_m > 0',
    lines: true,
  },
  test_pits: { from: 'test_pits t', geom: 't.geom', indexed: 't.geom', columns: 't.id::text AS id', where: 'TRUE', lines: false },
  utility_crossings: { from: 'utility_crossings t', geom: 't.geom', indexed: 't.geom', columns: 't.id::text AS id', where: 'TRUE', lines: false },
  depth_readings: { from: 'depth_readings t', geom: 't.geom', indexed: 't.geom', columns: 't.id::text AS id, t.cover_m', where: 'TRUE', lines: false },
  photos: { from: 'photos t', geom: 't.geom', indexed: 't.geom', columns: 't.id::text AS id', where: 'TRUE', lines: false },
  // addresses a later import removed are counted nowhere, and drawn nowhere
  addresses: { from: 'addresses t', geom: 't.geom', indexed: 't.geom', columns: 't.id::text AS id, t.key, t.passed, t.connected', where: 't.removed_in_import IS NULL', lines: false },
  // the stored uploads' features as parsed (tracks, lines and points); failed, withdrawn and superseded uploads are not drawn
  raw_traces: {
    from: 'upload_features t JOIN uploads u ON u.id = t.upload_id',
    geom: 't.geom',
    indexed: 't.geom',
    columns: 't.id, t.upload_id::text AS upload_id, t.kind',
    where: "u.status = 'stored'",
    lines: true,
  },
};

function layerQuery(layer: TileLayer, projectId: string, tile: TileAddress): { sql: string; bindings: (string | number)[] } {
  const l = LAYERS[layer];
  const simplify = l.lines && tile.z < SIMPLIFY_BELOW_ZOOM;
  const g3857 = simplify ? `ST_Simplify(ST_Transform(${l.geom}, 3857), ?::float8, true)` : `ST_Transform(${l.geom}, 3857)`;
  const sql = `(SELECT COALESCE(ST_AsMVT(q, ?::text, ${TILE_EXTENT}, 'geom'), ''::bytea) FROM (
      SELECT ST_AsMVTGeom(${g3857}, ST_TileEnvelope(?::int, ?::int, ?::int), ${TILE_EXTENT}, ${TILE_BUFFER}, true) AS geom, ${l.columns}
      FROM ${l.from}
      WHERE ${l.indexed} && ST_Transform(ST_TileEnvelope(?::int, ?::int, ?::int, margin => ?::float8), 4326)
        AND t.project_id = ?::uuid AND ${l.where}
    ) q)`;
  const { z, x, y } = tile;
  const bindings = [layer, ...(simplify ? [simplifyTolerance(z)] : []), z, x, y, z, x, y, TILE_BUFFER / TILE_EXTENT, projectId];
  return { sql, bindings };
}

/** The one statement of a tile (exported for EXPLAIN in the tests). */
export function tileQuery(projectId: string, tile: TileAddress): { sql: string; bindings: (string | number)[] } {
  const parts = tile.layers.map((layer) => layerQuery(layer, projectId, tile));
  return { sql: `SELECT ${parts.map((p) => p.sql).join(' || ')} AS tile`, bindings: parts.flatMap((p) => p.bindings) };
}

/**
 * The tile's bytes: one layer, or several concatenated in one statement. Empty (zero bytes) when no feature
 * of the project touches the tile. Never a named prepared statement.
 */
export async function projectTile(db: Db, projectId: string, tile: TileAddress): Promise<Buffer> {
  const { sql, bindings } = tileQuery(projectId, tile);
  const res = await db.raw(sql, bindings);
  const bytes = res.rows[0]?.tile as Buffer | null | undefined;
  return bytes ?? Buffer.alloc(0);
}
