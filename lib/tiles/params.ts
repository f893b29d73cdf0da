/**
 * Vector tiles of a project (issue 18): the layer catalogue and the tile address `{layer}/{z}/{x}/{y}.mvt`,
 * checked before any SQL runs. Pure: the route turns a refusal into a 400 `bad_parameter`.
 */

/** The layers a tile can hold; each is also the MVT layer's name. `all` is every layer in one tile. */
export const TILE_LAYERS = [
  'planned_routes',
  'sections',
  'road_crossings',
  'test_pits',
  'utility_crossings',
  'depth_readings',
  'photos',
  'addresses',
  'raw_traces',
] as const;

export type TileLayer = (typeof TILE_LAYERS)[number];

export const MAX_TILE_ZOOM = 22;
/** the MVT extent (tile units per side) and the clip buffer around a tile, in tile units */
export const TILE_EXTENT = 4096;
export const TILE_BUFFER = 64;
/** below this zoom lines are simplified with a tolerance of one tile unit; at and above it they are not */
export const SIMPLIFY_BELOW_ZOOM = 16;

export interface TileAddress {
  /** one layer, or every layer of the catalogue in its order */
  layers: TileLayer[];
  z: number;
  x: number;
  y: number;
}

export type TileParse = { ok: true; tile: TileAddress } | { ok: false; param: 'layer' | 'z' | 'x' | 'y'; message: string };

const WHOLE = /^(0|[1-9][0-9]{0,8})$/;

/**
 * The tile named by the route's segments: `parseTileParams({ layer: 'sections', z: '14', x: '8620', y: '5370.mvt' })`.
 * z is 0–22, x and y 0..2^z−1, the last segment ends in `.mvt`, the layer is in the catalogue or `all`.
 */
export function parseTileParams(p: { layer?: string; z?: string; x?: string; y?: string }): TileParse {
  const layer = p.layer ?? '';
  const isAll = layer === 'all';
  if (!isAll && !(TILE_LAYERS as readonly string[]).includes(layer)) {
    return { ok: false, param: 'layer', message: `layer: "${short(layer)}" is not a tile layer; it takes ${TILE_LAYERS.join(', ')} or all.` };
  }
  const zs = p.z ?? '';
  if (!WHOLE.test(zs) || Number(zs) > MAX_TILE_ZOOM) {
    return { ok: false, param: 'z', message: `z: "${short(zs)}" is not a zoom level; it takes a whole number from 0 to ${MAX_TILE_ZOOM}.` };
  }
  const z = Number(zs);
  const max = 2 ** z - 1;
  const xs = p.x ?? '';
  if (!WHOLE.test(xs) || Number(xs) > max) {
    return { ok: false, param: 'x', message: `x: "${short(xs)}" is not a tile column at zoom ${z}; it takes a whole number from 0 to ${max}.` };
  }
  const last = p.y ?? '';
  if (!last.endsWith('.mvt')) {
    return { ok: false, param: 'y', message: `y: the last segment "${short(last)}" must be {y}.mvt, a Mapbox Vector Tile (e.g. 0.mvt).` };
  }
  const ys = last.slice(0, -'.mvt'.length);
  if (!WHOLE.test(ys) || Number(ys) > max) {
    return { ok: false, param: 'y', message: `y: "${short(ys)}" is not a tile row at zoom ${z}; it takes a whole number from 0 to ${max}.` };
  }
  return { ok: true, tile: { layers: isAll ? [...TILE_LAYERS] : [layer as TileLayer], z, x: Number(xs), y: Number(ys) } };
}

/**
 * The Web Mercator (EPSG:3857) width of one tile unit at zoom z, in metres of the projection: the simplification
 * tolerance below `SIMPLIFY_BELOW_ZOOM`, 0 (no simplification) from there on. The world is 2π·6378137 m wide.
 */
export function simplifyTolerance(z: number): number {
  if (z >= SIMPLIFY_BELOW_ZOOM) return 0;
  return (2 * Math.PI * 6378137) / 2 ** z / TILE_EXTENT;
}

/** Does an If-None-Match header name this ETag (a list, weak validators and `*` included)? RFC 9110 §13.1.2. */
export function etagMatches(ifNoneMatch: string | null, etag: string): boolean {
  if (!ifNoneMatch) return false;
  if (ifNoneMatch.trim() === '*') return true;
  return ifNoneMatch.split(',').some((t) => t.trim().replace(/^W\//, '') === etag);
}

function short(s: string): string {
  return s.length > 40 ? `${s.slice(0, 40)}…` : s;
}
