import geodesic from 'geographiclib-geodesic';
import type { LonLat } from './types';

/** Distances and positions along a route on the WGS 84 ellipsoid (GeographicLib geodesics). */

const WGS84 = geodesic.Geodesic.WGS84;
const A = WGS84.a;
const E2 = WGS84.f * (2 - WGS84.f);
const RAD = Math.PI / 180;

/** A point in a local metric frame: metres east and north of the frame's origin. */
export type XY = [number, number];

export interface LocalFrame {
  toXY(p: LonLat): XY;
  /** the inverse of toXY */
  toLonLat(p: XY): LonLat;
}

/**
 * An equirectangular frame about `origin`, scaled by the WGS 84 radii of curvature there.
 * Scale error grows as tan(lat)·Δlat: ~1e-4 relative at 500 m from the origin at 45°, so it is for
 * comparing nearby geometry, never for the lengths we report.
 * `localFrame([13.4, 52.5]).toXY([13.4, 52.5])` → `[0, 0]`
 */
export function localFrame(origin: LonLat): LocalFrame {
  const f = frameScale(origin);
  return {
    toXY: (p) => frameXY(f, p),
    toLonLat: ([x, y]) => [f.lon0 + x / f.mx, f.lat0 + y / f.my],
  };
}

/** localFrame's origin and scales (metres per degree east and north) as data. */
export interface FrameScale {
  lon0: number;
  lat0: number;
  mx: number;
  my: number;
}

/** The scales of localFrame about `origin`, for code that converts many points without a closure a frame. */
export function frameScale(origin: LonLat): FrameScale {
  const [lon0, lat0] = origin;
  const perDegree = new Float64Array(2);
  metresPerDegreeInto(lat0, perDegree);
  return { lon0, lat0, mx: perDegree[0], my: perDegree[1] };
}

/**
 * Metres per degree of longitude (out[0]) and of latitude (out[1]) at a latitude, from the WGS 84 radii of
 * curvature, from one sine; written, not returned, so that no number crosses the call (the matcher asks once a fix).
 */
export function metresPerDegreeInto(lat: number, out: Float64Array): void {
  const s = Math.sin(lat * RAD);
  const w = 1 - E2 * s * s;
  out[0] = (A / Math.sqrt(w)) * Math.cos(lat * RAD) * RAD || 1e-9; // prime vertical radius × cos φ
  out[1] = ((A * (1 - E2)) / (w * Math.sqrt(w))) * RAD; // meridian radius
}

/**
 * A longitude difference d (degrees) wrapped into [−180, 180) as ((d % 360 + 540) % 360) − 180 computes it,
 * without the two remainders (calls into C, some 40 ns) where |d| < 90: there both are exact subtractions,
 * so the number is the same. `lonDelta(-0.25)` → −0.25, `lonDelta(359)` → −1
 */
export const lonDelta = (d: number): number => (d > -90 && d < 90 ? d + 540 - 360 - 180 : ((((d % 360) + 540) % 360) - 180));

/** localFrame's toXY: `frameXY(frameScale(o), p)` equals `localFrame(o).toXY(p)`. */
export function frameXY(f: FrameScale, p: LonLat): XY {
  // across the antimeridian too
  return [lonDelta(p[0] - f.lon0) * f.mx, (p[1] - f.lat0) * f.my];
}

/** Geodesic distance in metres between two positions, e.g. `distanceM([0, 0], [1, 0])` → 111319.49. */
export function distanceM(a: LonLat, b: LonLat): number {
  return WGS84.Inverse(a[1], a[0], b[1], b[0], geodesic.Geodesic.DISTANCE).s12 ?? 0;
}

// A route's chainages are asked for again and again in one reconciliation (graph, candidate index, sections),
// each time with GeographicLib: they are kept per coordinate array, with a copy of its values that must
// still match, so an array changed in place is measured afresh.
const chainageCache = new WeakMap<LonLat[], ChainageEntry>();

interface ChainageEntry {
  values: Float64Array;
  cum: number[];
  /** each segment's geodesic (GeographicLib InverseLine), made when a position on it is first asked for */
  lines: (ReturnType<typeof WGS84.InverseLine> | undefined)[];
}

function cachedEntry(coords: LonLat[]): ChainageEntry {
  const hit = chainageCache.get(coords);
  if (hit && hit.values.length === 2 * coords.length) {
    let same = true;
    for (let i = 0; same && i < coords.length; i++) same = hit.values[2 * i] === coords[i][0] && hit.values[2 * i + 1] === coords[i][1];
    if (same) return hit;
  }
  const cum = new Array<number>(coords.length);
  const values = new Float64Array(2 * coords.length);
  let sum = 0;
  for (let i = 0; i < coords.length; i++) {
    if (i > 0) sum += distanceM(coords[i - 1], coords[i]);
    cum[i] = sum;
    (values[2 * i] = coords[i][0]), (values[2 * i + 1] = coords[i][1]);
  }
  const entry: ChainageEntry = { values, cum, lines: [] };
  chainageCache.set(coords, entry);
  return entry;
}

const cachedCumulative = (coords: LonLat[]): readonly number[] => cachedEntry(coords).cum;

/**
 * Metres from the start at each vertex, e.g. `cumulativeChainage([[0, 0], [1, 0]])` → `[0, 111319.49]`.
 */
export function cumulativeChainage(coords: LonLat[]): number[] {
  return cachedCumulative(coords).slice();
}

/**
 * Chainage of the point a fraction t along segment i (vertex i → i + 1): the geodesic chainage of its start
 * plus t times the segment's geodesic length, as the candidate search interpolates (exact at the vertices,
 * ~1e-6 relative within a segment).
 * `chainageAtFraction([[0, 0], [1, 0]], 0, 0.5)` → 55659.75
 */
export function chainageAtFraction(coords: LonLat[], i: number, t: number): number {
  const cum = cachedCumulative(coords);
  return cum[i] + t * (cum[i + 1] - cum[i]);
}

/**
 * Length of the line: the sum of the GeographicLib inverse distances of its segments.
 * `lineLengthM([[0, 0], [1, 0]])` → 111319.4908 (1° on the equator)
 */
export function lineLengthM(coords: LonLat[]): number {
  return coords.length < 2 ? 0 : cachedCumulative(coords)[coords.length - 1];
}

/**
 * lineLengthM's sum (the same segments in the same order, so the same number) without keeping it: for a
 * line made once and measured once, such as a section's as-built line, a cache entry is only garbage.
 * `pathLengthM([[0, 0], [1, 0]])` → 111319.4908
 */
export function pathLengthM(coords: LonLat[]): number {
  let sum = 0;
  for (let i = 1; i < coords.length; i++) sum += distanceM(coords[i - 1], coords[i]);
  return sum;
}

/** The segment holding chainage `s`: the last i with cum[i] <= s, below the last vertex. */
function segmentAt(cum: readonly number[], s: number): number {
  let lo = 0;
  let hi = cum.length - 2;
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (cum[mid] <= s) lo = mid;
    else hi = mid - 1;
  }
  return lo;
}

/**
 * The position `chainageM` metres along the line, on the geodesic of its segment; clamped to the ends.
 * `pointAtChainage([[0, 0], [1, 0]], 111319.4908 / 2)` → `[0.5, 0]`
 */
export function pointAtChainage(coords: LonLat[], chainageM: number): LonLat {
  if (coords.length === 0) throw new RangeError('pointAtChainage needs at least one position');
  if (coords.length === 1 || chainageM <= 0) return [coords[0][0], coords[0][1]];
  const entry = cachedEntry(coords);
  const cum = entry.cum;
  const last = coords.length - 1;
  if (chainageM >= cum[last]) return [coords[last][0], coords[last][1]];
  const i = segmentAt(cum, chainageM);
  const [a, b] = [coords[i], coords[i + 1]];
  // the segment's geodesic, solved once however many positions are asked for on it
  const line = (entry.lines[i] ??= WGS84.InverseLine(a[1], a[0], b[1], b[0]));
  const p = line.Position(chainageM - cum[i]);
  return [p.lon2 ?? a[0], p.lat2 ?? a[1]];
}

export interface Projection {
  /** metres along the line from its start to the nearest point */
  chainageM: number;
  /** geodesic distance from the point to the line */
  distanceM: number;
  point: LonLat;
  /** index of the segment (coords[segment] → coords[segment + 1]) holding the nearest point */
  segment: number;
}

/**
 * Nearest point of a segment's geodesic to p, by Newton steps on the along-track offset: at the foot X
 * the geodesic X→p meets the line at a right angle, so s12·cos(azi(X→p) − azi(line at X)) is the
 * remaining offset. On a plane one step is exact; on the ellipsoid the residual shrinks by ~(d/R)² a step.
 */
function footOnSegment(a: LonLat, b: LonLat, p: LonLat, s0: number): { s: number; d: number; point: LonLat } {
  const line = WGS84.InverseLine(a[1], a[0], b[1], b[0]);
  const len = line.s13;
  let s = Math.min(Math.max(s0, 0), len);
  for (let iter = 0; ; iter++) {
    const x = line.Position(s);
    const lat = x.lat2 ?? a[1];
    const lon = x.lon2 ?? a[0];
    const r = WGS84.Inverse(lat, lon, p[1], p[0]);
    const d = r.s12 ?? 0;
    const along = d * Math.cos(((r.azi1 ?? 0) - (x.azi2 ?? 0)) * RAD);
    const next = Math.min(Math.max(s + along, 0), len);
    if (iter >= 8 || Math.abs(next - s) < 1e-7) return { s, d, point: [lon, lat] };
    s = next;
  }
}

/**
 * The nearest point of the line to p. Candidate segments are ranked in a local equirectangular frame about
 * each segment's start (cheap, and only a few segments come within 1 % of the best); the finalists are then
 * solved geodesically (footOnSegment), so distance and chainage are exact to well under 1 mm at city scale.
 * `projectOntoLine([[0, 0], [0.001, 0]], [0.0005, 0.0001])` → `{ chainageM: 55.66, distanceM: 11.06, segment: 0, … }`
 */
export function projectOntoLine(coords: LonLat[], p: LonLat): Projection {
  if (coords.length === 0) throw new RangeError('projectOntoLine needs at least one position');
  if (coords.length === 1) return { chainageM: 0, distanceM: distanceM(coords[0], p), point: [coords[0][0], coords[0][1]], segment: 0 };
  const planar: { i: number; d: number; s: number }[] = [];
  let best = Infinity;
  for (let i = 0; i < coords.length - 1; i++) {
    const f = localFrame(coords[i]);
    const [bx, by] = f.toXY(coords[i + 1]);
    const [px, py] = f.toXY(p);
    const l2 = bx * bx + by * by;
    const t = l2 > 0 ? Math.min(Math.max((px * bx + py * by) / l2, 0), 1) : 0;
    const d = Math.hypot(px - t * bx, py - t * by);
    planar.push({ i, d, s: t * Math.sqrt(l2) });
    best = Math.min(best, d);
  }
  // chainage at the finalists' vertices: the running sum of cumulativeChainage (kept per line)
  const cum = cachedCumulative(coords);
  const chainageAt = (i: number) => cum[i];
  let out: Projection | undefined;
  for (const c of planar) {
    if (c.d > best * 1.01 + 0.01) continue;
    const foot = footOnSegment(coords[c.i], coords[c.i + 1], p, c.s);
    if (!out || foot.d < out.distanceM) out = { chainageM: chainageAt(c.i) + foot.s, distanceM: foot.d, point: foot.point, segment: c.i };
  }
  return out!;
}
