import proj4 from 'proj4';
import type { Converter } from 'proj4';
import { IngestError, type CrsDefinition, type Position } from './types';

const WGS84 = '+proj=longlat +datum=WGS84 +no_defs';

/** A function from source coordinates (x, y[, z]) to WGS 84 [lon, lat[, height]]. */
export type ToWgs84 = (x: number, y: number, z?: number | null) => Position;

function params(def: string): Map<string, string> {
  const out = new Map<string, string>();
  for (const tok of def.trim().split(/\s+/)) {
    if (!tok.startsWith('+')) continue;
    const eq = tok.indexOf('=');
    out.set((eq < 0 ? tok.slice(1) : tok.slice(1, eq)).toLowerCase(), eq < 0 ? '' : tok.slice(eq + 1));
  }
  return out;
}

/** Metres per unit of the CRS's axes (1 for metres and for geographic CRSs). */
export function unitToMetre(def: CrsDefinition): number {
  const p = params(def.proj4);
  if (p.get('proj') === 'longlat' || p.get('proj') === 'latlong') return 1;
  if (p.has('to_meter')) return Number(p.get('to_meter'));
  const units: Record<string, number> = { m: 1, km: 1000, 'us-ft': 1200 / 3937, ft: 0.3048, 'ind-ft': 0.30479841, 'us-yd': 3600 / 3937, yd: 0.9144 };
  return units[p.get('units') ?? 'm'] ?? 1;
}

/**
 * Build the transformation from a catalogue CRS to WGS 84 lon/lat.
 *
 * Heights are not run through the datum shift: proj4 would treat them as ellipsoidal, while
 * survey heights are usually orthometric, so they pass through, only scaled from feet to metres
 * when the CRS's unit is a foot.
 *
 * @example
 * const toWgs84 = makeTransformer({ srid: 32633, name: 'WGS 84 / UTM zone 33N', proj4: '+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs' });
 * toWgs84(500000, 5000000); // [15, 45.1…]
 */
export function makeTransformer(def: CrsDefinition): ToWgs84 {
  const p = params(def.proj4);
  const zScale = unitToMetre(def);
  if (def.srid === 4326 || (p.get('proj') === 'longlat' && p.get('datum')?.toLowerCase() === 'wgs84' && !p.has('towgs84'))) {
    return (x, y, z) => (z == null ? [x, y] : [x, y, z]);
  }
  let conv: Converter;
  try {
    conv = proj4(def.proj4, WGS84);
  } catch (e) {
    throw new IngestError('unknown_crs', `the catalogue definition of EPSG:${def.srid} (${def.name}) cannot be used: ${(e as Error).message}`);
  }
  return (x, y, z) => {
    const [lon, lat] = conv.forward([x, y]);
    return z == null ? [lon, lat] : [lon, lat, z * zScale];
  };
}

/**
 * Say when the datum shift to WGS 84 is approximate, or null when it is exact or not needed.
 *
 * Approximate: a +towgs84 that is only a translation (3 parameters, or 7 with zero rotations
 * and scale), a +datum taken from proj4's built-in table on an ellipsoid other than WGS 84/GRS 80,
 * an ellipsoid with no shift at all, or a shift grid proj4 does not have.
 *
 * @example
 * datumWarning({ srid: 27700, name: 'OSGB 1936 / British National Grid', proj4: '+proj=tmerc … +datum=OSGB36 +units=m' });
 * // 'EPSG:27700 (OSGB 1936 / British National Grid): datum shift approximate: positions may be off by up to a few metres'
 */
export function datumWarning(def: CrsDefinition): string | null {
  const p = params(def.proj4);
  const label = `EPSG:${def.srid} (${def.name})`;
  const grids = p.get('nadgrids');
  if (grids && grids !== '@null') {
    return `${label}: the datum shift grid ${grids} is not available, so no datum shift is applied: positions may be off by tens to hundreds of metres`;
  }
  const towgs = p.get('towgs84')?.split(',').map(Number);
  if (towgs) {
    const translationOnly = towgs.length === 3 || towgs.slice(3).every((v) => v === 0);
    const zero = towgs.every((v) => v === 0);
    return translationOnly && !zero ? `${label}: datum shift approximate (translation only): positions may be off by up to a few metres` : null;
  }
  let a: number;
  try {
    a = (proj4.Proj(def.proj4) as unknown as { a: number }).a;
  } catch {
    return null;
  }
  // WGS 84 and GRS 80 (ETRS89, NAD83, GDA …) share a = 6378137 m; the datums are within a metre or so
  if (Math.abs(a - 6378137) < 0.5) return null;
  if (p.has('datum')) return `${label}: datum shift approximate: positions may be off by up to a few metres`;
  return `${label}: no datum shift to WGS 84 is defined: positions may be off by up to a few hundred metres`;
}
