import Flatbush from 'flatbush';
import { cumulativeChainage, lonDelta, metresPerDegreeInto } from './chainage';
import type { PlannedRouteInput } from './types';

/** Metres per degree of longitude and of latitude at a latitude (WGS 84 radii of curvature). */
export function metresPerDegree(lat: number): { mx: number; my: number } {
  metresPerDegreeInto(lat, PER_DEGREE);
  return { mx: PER_DEGREE[0], my: PER_DEGREE[1] };
}

const PER_DEGREE = new Float64Array(2);

/**
 * Points in a candidate index's frame: x, y, and ground metres per frame unit at each (the frame's scale is
 * only exact at its own centre). matchTrace keeps a trace's fixes so; the candidate search reads them so.
 */
export interface FramePoints {
  x: Float64Array;
  y: Float64Array;
  kx: Float64Array;
  ky: Float64Array;
}

/** Puts the position (lon, lat) into slot i of `p`, in the index's frame, with the ground scale there. */
export function toFrameInto(index: { lon0: number; lat0: number; mx0: number; my0: number }, lon: number, lat: number, p: FramePoints, i: number): void {
  p.x[i] = lonDelta(lon - index.lon0) * index.mx0;
  p.y[i] = (lat - index.lat0) * index.my0;
  metresPerDegreeInto(lat, PER_DEGREE);
  p.kx[i] = PER_DEGREE[0] / index.mx0;
  p.ky[i] = PER_DEGREE[1] / index.my0;
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
  // (plain loops, no destructuring or callbacks: this runs once a reconciliation, before V8 has optimised it)
  let minLon = Infinity;
  let minLat = Infinity;
  let maxLon = -Infinity;
  let maxLat = -Infinity;
  let nv = 0;
  let ns = 0;
  for (const r of routes) {
    for (const c of r.coords) (minLon = Math.min(minLon, c[0])), (minLat = Math.min(minLat, c[1])), (maxLon = Math.max(maxLon, c[0])), (maxLat = Math.max(maxLat, c[1]));
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
  for (let k = 0; k < routes.length; k++) {
    const coords = routes[k].coords;
    routeStart[k] = v;
    const c = cumulativeChainage(coords);
    for (let i = 0; i < coords.length; i++) {
      xs[v + i] = lonDelta(coords[i][0] - lon0) * mx0;
      ys[v + i] = (coords[i][1] - lat0) * my0;
      cum[v + i] = c[i];
      if (i > 0) (segRoute[s] = k), (segVertex[s] = v + i - 1), s++;
    }
    v += coords.length;
  }
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

/** The last planarFoot: where along the segment (0…1), the squared ground distance, and the side (+ left). */
const foot = { t: 0, d2: 0, cross: 0 };

/**
 * The nearest point of segment a → a + 1 (vertices in the index's frame) to the point (px, py), distances
 * in ground metres by the point's scale (kx, ky); into `foot`, so that the hot loops allocate nothing.
 */
function planarFoot(xs: Float64Array, ys: Float64Array, a: number, px: number, py: number, kx: number, ky: number): void {
  const ax = (xs[a] - px) * kx;
  const ay = (ys[a] - py) * ky;
  const dx = (xs[a + 1] - xs[a]) * kx;
  const dy = (ys[a + 1] - ys[a]) * ky;
  const l2 = dx * dx + dy * dy;
  let t = l2 > 0 ? -(ax * dx + ay * dy) / l2 : 0;
  t = t < 0 ? 0 : t > 1 ? 1 : t;
  const fx = ax + t * dx;
  const fy = ay + t * dy;
  foot.t = t;
  foot.d2 = fx * fx + fy * fy;
  // the point relative to the segment start is (−ax, −ay); cross > 0 puts it left of the direction of travel
  foot.cross = dx * -ay - dy * -ax;
}

/** Per-index scratch for the best segment per route, reused across queries (stamped, never cleared). */
interface Scratch {
  stamp: Int32Array;
  bestD2: Float64Array;
  bestSeg: Int32Array;
  bestT: Float64Array;
  bestCross: Float64Array;
  touched: Int32Array;
  /** the routes found by the last query, nearest first */
  order: Int32Array;
  /** flatbush traversal stack: node position, level */
  stack: Int32Array;
  query: number;
  /** the one fix of a query by position, in the frame */
  point: FramePoints;
}
const scratches = new WeakMap<CandidateIndex, Scratch>();

function scratchFor(index: CandidateIndex): Scratch {
  let s = scratches.get(index);
  if (!s) {
    const n = index.routes.length;
    s = {
      stamp: new Int32Array(n), bestD2: new Float64Array(n), bestSeg: new Int32Array(n), bestT: new Float64Array(n), bestCross: new Float64Array(n),
      touched: new Int32Array(n), order: new Int32Array(n + 1), stack: new Int32Array(64), query: 0,
      point: { x: new Float64Array(1), y: new Float64Array(1), kx: new Float64Array(1), ky: new Float64Array(1) },
    };
    scratches.set(index, s);
  }
  return s;
}

/**
 * The best projection of the fix onto each route with a segment within `radiusM`, nearest first, at most
 * `max`: fills the scratch (order, bestD2, bestSeg, bestT, bestCross) and returns how many routes.
 * Walks flatbush's tree itself (its `search` in the same order, without a callback or result arrays),
 * so the segments are visited exactly as `tree.search` would visit them.
 */
function nearestRoutes(index: CandidateIndex, sc: Scratch, pts: FramePoints, at: number, radiusM: number, max: number): number {
  const tree = index.tree!;
  const q = ++sc.query;
  const { xs, ys, segRoute, segVertex } = index;
  const kx = pts.kx[at];
  const ky = pts.ky[at];
  const px = pts.x[at];
  const py = pts.y[at];
  const r2 = radiusM * radiusM;
  const minX = px - radiusM / kx;
  const minY = py - radiusM / ky;
  const maxX = px + radiusM / kx;
  const maxY = py + radiusM / ky;
  const { _boxes: boxes, _indices: indices, _levelBounds: levelBounds, nodeSize } = tree;
  const numItems4 = tree.numItems * 4;
  const { stamp, bestD2, bestSeg, bestT, bestCross, order } = sc;
  let stack = sc.stack;
  let top = 0;
  let touched = 0;
  let nodeIndex = boxes.length - 4;
  let level = levelBounds.length - 1;
  // a node wholly inside the query box has its leaves swept without box tests, as flatbush does
  let contained = false;
  for (;;) {
    const nodeEnd = Math.min(nodeIndex + nodeSize * 4, levelBounds[level]);
    let pos = nodeIndex;
    let end = nodeEnd;
    if (contained) {
      for (let l = level; l > 0; l--) pos = indices[pos >> 2];
      end = Math.min(pos + (nodeEnd - nodeIndex) * nodeSize ** level, numItems4);
    }
    const isNode = !contained && nodeIndex >= numItems4;
    for (; pos < end; pos += 4) {
      const x0 = boxes[pos];
      const y0 = boxes[pos + 1];
      const x1 = boxes[pos + 2];
      const y1 = boxes[pos + 3];
      if (!contained && (maxX < x0 || maxY < y0 || minX > x1 || minY > y1)) continue;
      const id = indices[pos >> 2] | 0;
      if (isNode) {
        if (top + 2 > stack.length) {
          const grown = new Int32Array(stack.length * 2);
          grown.set(stack);
          stack = sc.stack = grown;
        }
        (stack[top++] = id | +(minX <= x0 && minY <= y0 && maxX >= x1 && maxY >= y1)), (stack[top++] = level - 1);
        continue;
      }
      const a = segVertex[id];
      planarFoot(xs, ys, a, px, py, kx, ky);
      const d2 = foot.d2;
      if (d2 > r2) continue;
      const k = segRoute[id];
      if (stamp[k] !== q) {
        stamp[k] = q;
        sc.touched[touched++] = k;
      } else if (d2 >= bestD2[k]) continue;
      bestD2[k] = d2;
      bestSeg[k] = id;
      bestT[k] = foot.t;
      bestCross[k] = foot.cross;
    }
    if (top === 0) break;
    level = stack[--top];
    nodeIndex = stack[--top];
    contained = (nodeIndex & 1) === 1;
    nodeIndex &= ~1;
  }
  // partial selection: the lists are a handful long
  let n = 0;
  for (let i = 0; i < touched; i++) {
    const k = sc.touched[i];
    if (n === max && bestD2[k] >= bestD2[order[max - 1]]) continue;
    let j = n++;
    for (; j > 0 && bestD2[order[j - 1]] > bestD2[k]; j--) order[j] = order[j - 1];
    order[j] = k;
    if (n > max) n--;
  }
  return n;
}

/**
 * The candidates of many fixes in flat columns, appended fix by fix: a 100,000-fix trace's candidates take
 * ~14 MB here instead of half a million objects. Candidate c of the whole list has route[c], chainage[c], …
 */
export class CandidateColumns {
  route = new Int32Array(1024);
  chainage = new Float64Array(1024);
  distance = new Float64Array(1024);
  offset = new Float64Array(1024);
  length = 0;

  /** room for `extra` more candidates */
  reserve(extra: number): void {
    const need = this.length + extra;
    if (need <= this.route.length) return;
    const size = Math.max(need, this.route.length * 2);
    const grow = <T extends Int32Array | Float64Array>(a: T, b: T): T => (b.set(a.subarray(0, this.length)), b);
    this.route = grow(this.route, new Int32Array(size));
    this.chainage = grow(this.chainage, new Float64Array(size));
    this.distance = grow(this.distance, new Float64Array(size));
    this.offset = grow(this.offset, new Float64Array(size));
  }
}

/**
 * Up to `max` candidates within `radiusM` of point `at` of points in the index's frame (toFrameInto), the best
 * projection per route, nearest first, appended to `out`. Distances are planar in the index's frame rescaled to
 * the fix's latitude (≪ 1 mm error within the radius); chainage is the geodesic chainage of the segment's start
 * plus the segment's geodesic length × the planar fraction, so it agrees with lineLengthM at the vertices and to
 * ~1e-6 relative within a segment.
 * `appendCandidatesAt(index, plane, 7, 16, 5, cols)` → 3: the candidates of the trace's eighth fix, cols grown by three
 */
export function appendCandidatesAt(index: CandidateIndex, pts: FramePoints, at: number, radiusM: number, max: number, out: CandidateColumns): number {
  if (!index.tree || max <= 0) return 0;
  const sc = scratchFor(index);
  const n = nearestRoutes(index, sc, pts, at, radiusM, max);
  out.reserve(n);
  for (let i = 0; i < n; i++) {
    const k = sc.order[i];
    const a = index.segVertex[sc.bestSeg[k]];
    const d = Math.sqrt(sc.bestD2[k]);
    const c = out.length++;
    out.route[c] = k;
    out.chainage[c] = index.cum[a] + sc.bestT[k] * (index.cum[a + 1] - index.cum[a]);
    out.distance[c] = d;
    out.offset[c] = sc.bestCross[k] < 0 ? -d : d;
  }
  return n;
}

/**
 * The fix's best projection onto one route of the index (route k, its index in index.routes), with the
 * arithmetic of the candidate search: chainage, signed offset (+ left) and distance, whatever the radius.
 * Puts a fix on a route the matcher did not choose for it (a junction hop put back on the walked route).
 * `projectOntoRoute(index, 0, { lon: 13.405, lat: 52.52 })` → `{ chainageM: 40.2, offsetM: -2.9, distanceM: 2.9 }`
 */
export function projectOntoRoute(index: CandidateIndex, k: number, fix: { lon: number; lat: number }): { chainageM: number; offsetM: number; distanceM: number } {
  const pt = scratchFor(index).point;
  toFrameInto(index, fix.lon, fix.lat, pt, 0);
  const out = { chainageM: 0, offsetM: 0, distanceM: 0 };
  projectInFrame(index, k, pt.x[0], pt.y[0], pt.kx[0], pt.ky[0], out);
  return out;
}

/**
 * projectOntoRoute for a point already in the index's frame (x, y) with its ground metres per frame unit
 * (kx, ky), written into `out`: the matcher has its fixes in that frame.
 */
export function projectInFrame(index: CandidateIndex, k: number, px: number, py: number, kx: number, ky: number, out: { chainageM: number; offsetM: number; distanceM: number }): void {
  const { xs, ys, cum } = index;
  const v0 = index.routeStart[k];
  const v1 = index.routeStart[k + 1];
  let bestD2 = Infinity;
  let bestA = v0;
  let bestT = 0;
  let bestCross = 0;
  for (let a = v0; a + 1 < v1; a++) {
    planarFoot(xs, ys, a, px, py, kx, ky);
    if (foot.d2 < bestD2) (bestD2 = foot.d2), (bestA = a), (bestT = foot.t), (bestCross = foot.cross);
  }
  if (bestD2 === Infinity) {
    (out.chainageM = 0), (out.offsetM = 0), (out.distanceM = Infinity);
    return;
  }
  const d = Math.sqrt(bestD2);
  out.chainageM = cum[bestA] + bestT * (cum[bestA + 1] - cum[bestA]);
  out.offsetM = bestCross < 0 ? -d : d;
  out.distanceM = d;
}
