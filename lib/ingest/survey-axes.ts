import proj4 from 'proj4';
import { IngestError, type CrsDefinition, type Position } from './types';

/** One reading of the coordinate columns: the source pairs and what they become in WGS 84. */
export interface Oriented {
  source: [number, number][];
  lonlat: Position[];
}

interface Common {
  asIs: Oriented;
  swapped: Oriented;
  extent: [number, number, number, number] | null;
  /** the two coordinate headers, in (x, y) / (lon, lat) order */
  columns: [string, string];
  rows: number[];
}
export type SwapCheck = ({ kind: 'geographic' } | { kind: 'projected'; def: CrsDefinition }) & Common;

const valid = (p: Position) => Number.isFinite(p[0]) && Number.isFinite(p[1]) && Math.abs(p[1]) <= 90 && Math.abs(p[0]) <= 180;
const inside = (p: Position, e: [number, number, number, number]) => p[0] >= e[0] && p[0] <= e[2] && p[1] >= e[1] && p[1] <= e[3];
const fmt = (p: Position) => `${p[1].toFixed(5)}, ${p[0].toFixed(5)}`;

/**
 * A test that a projected position is one the CRS is meant for: it round-trips through the
 * projection within a metre, and for transverse Mercator it lies within 15° of the central
 * meridian (zones are a few degrees wide; far outside, the projection's series break down).
 */
export function projectedGood(def: CrsDefinition): (p: Position, src: [number, number]) => boolean {
  const back = proj4('+proj=longlat +datum=WGS84 +no_defs', def.proj4);
  const info = proj4.Proj(def.proj4) as unknown as { projName?: string; long0?: number };
  const tm = ['utm', 'tmerc', 'etmerc'].includes(String(info.projName));
  const lon0 = ((info.long0 ?? 0) * 180) / Math.PI;
  return (p, src) => {
    if (!valid(p)) return false;
    if (tm && Math.abs(((p[0] - lon0 + 540) % 360) - 180) > 15) return false;
    const [x, y] = back.forward([p[0], p[1]]);
    return Math.hypot(x - src[0], y - src[1]) < 1;
  };
}

/**
 * Throw 'swapped_axes' when the coordinate columns look swapped: as given no row is usable (or
 * none falls in the project's extent) while swapped every row is (or all fall inside it).
 *
 * @example
 * checkSwap({ kind: 'geographic', asIs, swapped, extent: null, columns: ['lon', 'lat'], rows: [2, 3] });
 */
export function checkSwap(c: SwapCheck): void {
  const n = c.asIs.lonlat.length;
  if (n === 0) return;
  const [first, second] = c.columns;
  const fix =
    c.kind === 'geographic'
      ? `map columns.lat to '${first}' and columns.lon to '${second}', or swap the two columns in the file`
      : `map columns.x to '${second}' and columns.y to '${first}', or swap the two columns in the file`;
  const what = c.kind === 'geographic' ? `latitude '${second}' and longitude '${first}'` : `easting '${first}' and northing '${second}'`;

  if (c.extent) {
    const e = c.extent;
    const inAsIs = c.asIs.lonlat.filter((p) => inside(p, e)).length;
    const inSwapped = c.swapped.lonlat.filter((p) => inside(p, e)).length;
    if (inAsIs === 0 && inSwapped === n) {
      throw new IngestError('swapped_axes', `the ${what} columns look swapped: as given no row lies in the project's area, swapped every row does (row ${c.rows[0]} would be at ${fmt(c.swapped.lonlat[0])}); ${fix}`, { rows: c.rows.slice(0, 50) });
    }
  }

  if (c.kind === 'geographic') {
    const latBeyond = c.asIs.lonlat.map((p, i) => (Math.abs(p[1]) > 90 ? i : -1)).filter((i) => i >= 0);
    // a swap turns every row around: when only some rows are beyond ±90, those rows are just wrong
    if (latBeyond.length === n && c.swapped.lonlat.every(valid)) {
      const i = latBeyond[0];
      throw new IngestError(
        'swapped_axes',
        `the ${what} columns look swapped: latitude is beyond ±90 in ${latBeyond.length} row(s) (row ${c.rows[i]}: ${c.asIs.lonlat[i][1]}) while longitude stays within ±90; ${fix}`,
        { rows: latBeyond.slice(0, 50).map((j) => c.rows[j]), count: latBeyond.length },
      );
    }
    return;
  }

  const good = projectedGood(c.def);
  const badAsIs = c.asIs.lonlat.every((p, i) => !good(p, c.asIs.source[i]));
  const goodSwapped = c.swapped.lonlat.every((p, i) => good(p, c.swapped.source[i]));
  if (badAsIs && goodSwapped) {
    throw new IngestError(
      'swapped_axes',
      `the ${what} columns look swapped for EPSG:${c.def.srid} (${c.def.name}): as given the values lie outside the area of that coordinate system, swapped they fit (row ${c.rows[0]} would be at ${fmt(c.swapped.lonlat[0])}); ${fix}`,
      { rows: c.rows.slice(0, 50) },
    );
  }
}
