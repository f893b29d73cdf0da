import Flatbush from 'flatbush';
import geodesic from 'geographiclib-geodesic';
import { cumulativeChainage } from './chainage';
import type { Candidate } from './match-types';
import type { PlannedRouteInput } from './types';

const WGS84 = geodesic.Geodesic.WGS84;
const E2 = WGS84.f * (2 - WGS84.f);
const RAD = Math.PI / 180;

/** Metres per degree of longitude and of latitude at a latitude (WGS 84 radii of curvature). */
export function metresPerDegree(lat: number): { mx: number; my: number } {
  const s = Math.sin(lat * RAD);
  const w = 1 - E2 * s * s;
  return { mx: ((WGS84.a / Math.sqrt(w)) * Math.cos(lat * RAD) * RAD) || 1e-9, my: ((WGS84.a * (1 - E2)) / (w * Math.sqrt(w))) * RAD };
}

/**
 * Route segments in one equirectangular frame about the network's centre, with a flatbush index over them.
 * Vertices of all routes live in flat typed arrays; `cum` holds the geodesic chainage at each vertex, so a
 * candidate's chainage is geodesic at the vertices and interpolated within a segment.
 */
export interface CandidateIndex {
  routes: PlannedRouteInput[];
  lon0: number;
  lat0: number;
  mx0: number;
  my0: number;
  xs: Float64Array;
  ys: Float64Array;
  cum: Float64Array;
  /** first global vertex of each route */
  routeStart: Int32Array;
  segRoute: Int32Array;
  /** global index of each segment's first vertex */
  segVertex: Int32Array;
  tree: Flatbush | null;
}

/**
 * Indexes every segment of the routes for nearest-route queries.
 * `makeCandidateIndex(routes).segRoute.length` → the number of segments of all routes
 */
export function makeCandidateIndex(routes: PlannedRouteInput[]): CandidateIndex {
  let [minLon, minLat, maxLon, maxLat] = [Infinity, Infinity, -Infinity, -Infinity];
  let nv = 0;
  let ns = 0;
  for (const r of routes) {
    for (const [x, y] of r.coords) [minLon, minLat, maxLon, maxLat] = [Math.min(minLon, x), Math.min(minLat, y), Math.max(maxLon, x), Math.max(maxLat, y)];
    nv += r.coords.length;
    ns += Math.max(r.coords.length - 1, 0);
  }
  const lon0 = nv ? (minLon + maxLon) / 2 : 0;
  const lat0 = nv ? (minLat + maxLat) / 2 : 0;
  const { mx: mx0, my: my0 } = metresPerDegree(lat0);
  const xs = new Float64Array(nv);
  const ys = new Float64Array(nv);
  const cum = new Float64Array(nv);
  const routeStart = new Int32Array(routes.length + 1);
  const segRoute = new Int32Array(ns);
  const segVertex = new Int32Array(ns);
  let v = 0;
  let s = 0;
  routes.forEach((r, k) => {
    routeStart[k] = v;
    const c = cumulativeChainage(r.coords);
    r.coords.forEach(([lon, lat], i) => {
      xs[v + i] = (((((lon - lon0) % 360) + 540) % 360) - 180) * mx0;
      ys[v + i] = (lat - lat0) * my0;
      cum[v + i] = c[i];
      if (i > 0) (segRoute[s] = k), (segVertex[s] = v + i - 1), s++;
    });
    v += r.coords.length;
  });
  routeStart[routes.length] = v;
  let tree: Flatbush | null = null;
  if (ns > 0) {
    tree = new Flatbush(ns);
    for (let i = 0; i < ns; i++) {
      const a = segVertex[i];
      tree.add(Math.min(xs[a], xs[a + 1]), Math.min(ys[a], ys[a + 1]), Math.max(xs[a], xs[a + 1]), Math.max(ys[a], ys[a + 1]));
    }
    tree.finish();
  }
  return { routes, lon0, lat0, mx0, my0, xs, ys, cum, routeStart, segRoute, segVertex, tree };
}

/** Per-index scratch for the best segment per route, reused across queries (stamped, never cleared). */
interface Scratch {
  stamp: Int32Array;
  bestD2: Float64Array;
  bestSeg: Int32Array;
  bestT: Float64Array;
  bestCross: Float64Array;
  touched: Int32Array;
  query: number;
}
const scratches = new WeakMap<CandidateIndex, Scratch>();

function scratchFor(index: CandidateIndex): Scratch {
  let s = scratches.get(index);
  if (!s) {
    const n = index.routes.length;
    s = { stamp: new Int32Array(n), bestD2: new Float64Array(n), bestSeg: new Int32Array(n), bestT: new Float64Array(n), bestCross: new Float64Array(n), touched: new Int32Array(n), query: 0 };
    scratches.set(index, s);
  }
  return s;
}

/**
 * Up to `max` candidates within `radiusM` of the fix, the best projection per route, nearest first.
 * Distances are planar in the index's frame rescaled to the fix's latitude (≪ 1 mm error within the radius);
 * chainage is the geodesic chainage of the segment's start plus the segment's geodesic length × the planar
 * fraction, so it agrees with lineLengthM at the vertices and to ~1e-6 relative within a segment.
 * `candidatesFor(index, { lon: 13.405, lat: 52.52 }, 16, 5)` → `[{ ref: 'N1', distanceM: 2.9, offsetM: -2.9, … }, …]`
 */
export function candidatesFor(index: CandidateIndex, fix: { lon: number; lat: number }, radiusM: number, max: number): Candidate[] {
  if (!index.tree || max <= 0) return [];
  const sc = scratchFor(index);
  const q = ++sc.query;
  const { xs, ys, segRoute, segVertex } = index;
  const { mx, my } = metresPerDegree(fix.lat);
  // ground metres per frame unit at the fix: the frame's scale is only exact at its own centre
  const kx = mx / index.mx0;
  const ky = my / index.my0;
  const px = (((((fix.lon - index.lon0) % 360) + 540) % 360) - 180) * index.mx0;
  const py = (fix.lat - index.lat0) * index.my0;
  const r2 = radiusM * radiusM;
  let touched = 0;
  index.tree.search(px - radiusM / kx, py - radiusM / ky, px + radiusM / kx, py + radiusM / ky, (seg) => {
    const a = segVertex[seg];
    const ax = (xs[a] - px) * kx;
    const ay = (ys[a] - py) * ky;
    const dx = (xs[a + 1] - xs[a]) * kx;
    const dy = (ys[a + 1] - ys[a]) * ky;
    const l2 = dx * dx + dy * dy;
    let t = l2 > 0 ? -(ax * dx + ay * dy) / l2 : 0;
    t = t < 0 ? 0 : t > 1 ? 1 : t;
    const fx = ax + t * dx;
    const fy = ay + t * dy;
    const d2 = fx * fx + fy * fy;
    if (d2 > r2) return false;
    const k = segRoute[seg];
    if (sc.stamp[k] !== q) {
      sc.stamp[k] = q;
      sc.touched[touched++] = k;
    } else if (d2 >= sc.bestD2[k]) return false;
    sc.bestD2[k] = d2;
    sc.bestSeg[k] = seg;
    sc.bestT[k] = t;
    // fix relative to the segment start is (−ax, −ay); cross > 0 puts it left of the direction of travel
    sc.bestCross[k] = dx * -ay - dy * -ax;
    return false; // results are collected here; flatbush's own list stays empty
  });
  // partial selection: the lists are a handful long
  const order: number[] = [];
  for (let i = 0; i < touched; i++) {
    const k = sc.touched[i];
    if (order.length === max && sc.bestD2[k] >= sc.bestD2[order[max - 1]]) continue;
    let j = order.length;
    order.push(k);
    for (; j > 0 && sc.bestD2[order[j - 1]] > sc.bestD2[k]; j--) order[j] = order[j - 1];
    order[j] = k;
    if (order.length > max) order.pop();
  }
  return order.map((k) => {
    const seg = sc.bestSeg[k];
    const a = segVertex[seg];
    const d = Math.sqrt(sc.bestD2[k]);
    return {
      route: k,
      ref: index.routes[k].ref,
      segment: a - index.routeStart[k],
      chainageM: index.cum[a] + sc.bestT[k] * (index.cum[a + 1] - index.cum[a]),
      distanceM: d,
      offsetM: sc.bestCross[k] < 0 ? -d : d,
    };
  });
}
