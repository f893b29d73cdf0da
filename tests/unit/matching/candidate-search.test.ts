import geodesic from 'geographiclib-geodesic';
import { describe, expect, it } from 'vitest';
import { appendCandidatesAt, CandidateColumns, makeCandidateIndex, toFrameInto, type CandidateIndex, type FramePoints } from '@/lib/matching/candidates';
import type { LonLat, PlannedRouteInput } from '@/lib/matching/types';
import { mulberry32 } from './scenario';

// The candidate search walks flatbush's packed tree itself (nearestRoutes in candidates.ts: its own stack, no
// callback, leaves of a node wholly inside the query box swept without box tests). Checked here on seeded
// random networks against three others that find the same segments their own way:
//  - flatbush's own `search` over the same box (its traversal, its order: so ties fall the same way, exactly);
//  - flatbush's own `neighbors` (a priority queue by box distance, another traversal altogether);
//  - a brute force over every segment of every route, with its own ground arithmetic (the WGS 84 radii of
//    curvature at the fix) and GeographicLib's geodesic chainage [GeographicLib].

const WGS84 = geodesic.Geodesic.WGS84;

/** A fix in metres east and north of `origin` (plain degrees per metre: the search does not care how it was drawn). */
const at = (origin: LonLat, x: number, y: number): LonLat => [origin[0] + x / (111_320 * Math.cos((origin[1] * Math.PI) / 180)), origin[1] + y / 110_574];

/**
 * A random network: routes of 1–7 segments, steps up to 80 m in any direction, a third of them starting at a
 * vertex of an earlier route (junctions: shared vertices, ties between routes), some with a repeated vertex
 * (a zero-length segment) and some drawn twice under two refs (duplicates: exact ties).
 */
function randomNetwork(rng: () => number, origin: LonLat, routes: number, spanM: number): PlannedRouteInput[] {
  const out: PlannedRouteInput[] = [];
  const xy: [number, number][][] = [];
  for (let k = 0; k < routes; k++) {
    if (k > 0 && rng() < 0.04) {
      const copy = xy[Math.floor(rng() * xy.length)];
      xy.push(copy);
      out.push({ ref: `R${k}`, street: null, ducts: null, kind: 'street', coords: copy.map(([x, y]) => at(origin, x, y)) });
      continue;
    }
    let p: [number, number];
    if (k > 0 && rng() < 0.33) {
      const other = xy[Math.floor(rng() * xy.length)];
      p = other[Math.floor(rng() * other.length)];
    } else p = [(rng() - 0.5) * spanM, (rng() - 0.5) * spanM];
    const pts: [number, number][] = [p];
    const steps = 1 + Math.floor(rng() * 7);
    for (let s = 0; s < steps; s++) {
      const last = pts[pts.length - 1];
      if (rng() < 0.05) pts.push([last[0], last[1]]);
      else {
        const a = rng() * 2 * Math.PI;
        const l = rng() * 80;
        pts.push([last[0] + l * Math.cos(a), last[1] + l * Math.sin(a)]);
      }
    }
    xy.push(pts);
    out.push({ ref: `R${k}`, street: null, ducts: null, kind: 'street', coords: pts.map(([x, y]) => at(origin, x, y)) });
  }
  return out;
}

interface Found {
  route: number;
  chainage: number;
  distance: number;
  offset: number;
}

/**
 * Per route, the best of the given segments within radiusM of point 0 of `p`, with the planar arithmetic the
 * candidate search documents (segment a → a + 1 in the index's frame, ground metres by the fix's scale, the
 * first segment found kept on a tie); then nearest first, ties in the order routes were first found, at most `max`.
 */
function bestOf(index: CandidateIndex, p: FramePoints, segments: number[], radiusM: number, max: number): Found[] {
  const { xs, ys, cum, segRoute, segVertex } = index;
  const [px, py, kx, ky] = [p.x[0], p.y[0], p.kx[0], p.ky[0]];
  const best = new Map<number, Found & { d2: number }>();
  for (const id of segments) {
    const a = segVertex[id];
    const ax = (xs[a] - px) * kx;
    const ay = (ys[a] - py) * ky;
    const dx = (xs[a + 1] - xs[a]) * kx;
    const dy = (ys[a + 1] - ys[a]) * ky;
    const l2 = dx * dx + dy * dy;
    const t = Math.min(Math.max(l2 > 0 ? -(ax * dx + ay * dy) / l2 : 0, 0), 1);
    const fx = ax + t * dx;
    const fy = ay + t * dy;
    const d2 = fx * fx + fy * fy;
    if (d2 > radiusM * radiusM) continue;
    const k = segRoute[id];
    const prev = best.get(k);
    if (prev && d2 >= prev.d2) continue;
    const d = Math.sqrt(d2);
    best.set(k, { route: k, chainage: cum[a] + t * (cum[a + 1] - cum[a]), distance: d, offset: dx * -ay - dy * -ax < 0 ? -d : d, d2 });
  }
  // Array.prototype.sort is stable (ECMAScript 2019): equal distances keep the order the routes were found in
  return [...best.values()].sort((a, b) => a.d2 - b.d2).slice(0, max).map(({ route, chainage, distance, offset }) => ({ route, chainage, distance, offset }));
}

/**
 * Brute force: every route's nearest point to the fix, from lon/lat, in a plane tangent at the fix, and the
 * side of it the fix lies on, or 0 when segments as near (within 1 nm: a bend's shared vertex) disagree.
 */
function bruteForce(routes: PlannedRouteInput[], lengths: number[][], fix: LonLat): { distance: number; chainage: number; side: number }[] {
  // metres per degree east and north at the fix from the WGS 84 radii of curvature (prime vertical, meridian)
  const phi = (fix[1] * Math.PI) / 180;
  const e2 = WGS84.f * (2 - WGS84.f);
  const w = Math.sqrt(1 - e2 * Math.sin(phi) ** 2);
  const east = ((WGS84.a / w) * Math.cos(phi) * Math.PI) / 180;
  const north = ((WGS84.a * (1 - e2)) / w ** 3) * (Math.PI / 180);
  return routes.map((r, k) => {
    let best = { distance: Infinity, chainage: 0, side: 0 };
    const sides: [number, number][] = [];
    let along = 0;
    for (let i = 0; i + 1 < r.coords.length; i++) {
      const [u, v] = [r.coords[i], r.coords[i + 1]];
      const [ux, uy] = [(u[0] - fix[0]) * east, (u[1] - fix[1]) * north];
      const [vx, vy] = [(v[0] - fix[0]) * east, (v[1] - fix[1]) * north];
      const len = Math.hypot(vx - ux, vy - uy);
      const t = len === 0 ? 0 : Math.min(1, Math.max(0, (-ux * (vx - ux) - uy * (vy - uy)) / (len * len)));
      const d = Math.hypot(ux + t * (vx - ux), uy + t * (vy - uy));
      const geodesicLength = lengths[k][i];
      const side = Math.sign((vx - ux) * -uy - (vy - uy) * -ux);
      sides.push([d, side]);
      if (d < best.distance) best = { distance: d, chainage: along + t * geodesicLength, side };
      along += geodesicLength;
    }
    const near = new Set(sides.filter(([d]) => d <= best.distance + 1e-9).map(([, side]) => side));
    return { ...best, side: near.size === 1 ? best.side : 0 };
  });
}

/** Whether flatbush's tree has an inner node wholly inside the box: the search then sweeps its leaves unchecked. */
function containsNode(index: CandidateIndex, minX: number, minY: number, maxX: number, maxY: number): boolean {
  const tree = index.tree!;
  const boxes = tree._boxes;
  for (let pos = tree.numItems * 4; pos < boxes.length; pos += 4) {
    if (minX <= boxes[pos] && minY <= boxes[pos + 1] && maxX >= boxes[pos + 2] && maxY >= boxes[pos + 3]) return true;
  }
  return false;
}

const CASES = [
  { name: 'one route of one segment', seed: 1, origin: [13.405, 52.52] as LonLat, routes: 1, spanM: 50 },
  { name: 'a root node only (≤ 16 segments)', seed: 2, origin: [13.405, 52.52] as LonLat, routes: 4, spanM: 120 },
  { name: 'two levels', seed: 3, origin: [-0.1276, 51.507] as LonLat, routes: 60, spanM: 400 },
  { name: 'four levels, town-sized', seed: 4, origin: [13.405, 52.52] as LonLat, routes: 900, spanM: 1500 },
  { name: 'far north (scales differ a lot east and north)', seed: 5, origin: [18.955, 69.649] as LonLat, routes: 400, spanM: 800 },
  { name: 'southern hemisphere', seed: 6, origin: [151.209, -33.869] as LonLat, routes: 400, spanM: 800 },
];

describe('the hand-written tree search of the candidate index', () => {
  it.each(CASES)('$name: the same candidates as flatbush\'s search and neighbors, and as a brute force', ({ seed, origin, routes: n, spanM }) => {
    const rng = mulberry32(seed);
    const routes = randomNetwork(rng, origin, n, spanM);
    const index = makeCandidateIndex(routes);
    const tree = index.tree!;
    const lengths = routes.map((r) => r.coords.slice(1).map((v, i) => WGS84.Inverse(r.coords[i][1], r.coords[i][0], v[1], v[0]).s12!));
    const p: FramePoints = { x: new Float64Array(1), y: new Float64Array(1), kx: new Float64Array(1), ky: new Float64Array(1) };
    const cols = new CandidateColumns();
    const tally = { queries: 0, found: 0, truncated: 0, contained: 0 };
    const wrong: string[] = [];
    for (let q = 0; q < 400; q++) {
      // half the fixes near a vertex (something in reach), half anywhere over the network and a margin round it
      const r = routes[Math.floor(rng() * routes.length)];
      const v = r.coords[Math.floor(rng() * r.coords.length)];
      const fix: LonLat = rng() < 0.5 ? at(v, (rng() - 0.5) * 40, (rng() - 0.5) * 40) : at(origin, (rng() - 0.5) * spanM * 1.3, (rng() - 0.5) * spanM * 1.3);
      const radiusM = [0.5, 4, 16.5, 60, 250][Math.floor(rng() * 5)];
      const max = [1, 2, 5, 1000][Math.floor(rng() * 4)];

      toFrameInto(index, fix[0], fix[1], p, 0);
      cols.length = 0;
      const count = appendCandidatesAt(index, p, 0, radiusM, max, cols);
      const got: Found[] = [];
      for (let c = 0; c < count; c++) got.push({ route: cols.route[c], chainage: cols.chainage[c], distance: cols.distance[c], offset: cols.offset[c] });

      // 1. flatbush's search over the box the candidate search uses: the same candidates, number for number
      const [minX, minY, maxX, maxY] = [p.x[0] - radiusM / p.kx[0], p.y[0] - radiusM / p.ky[0], p.x[0] + radiusM / p.kx[0], p.y[0] + radiusM / p.ky[0]];
      expect(got).toEqual(bestOf(index, p, tree.search(minX, minY, maxX, maxY), radiusM, max));

      // 2. flatbush's neighbors, every box within reach in frame units (a superset: the ground scales differ east
      // and north): every route in reach, at the same distances, as the search finds them with no limit
      const reach = radiusM / Math.min(p.kx[0], p.ky[0]);
      const byDistance = (xs: Found[]) => xs.map((x) => [x.distance, x.route]).sort((a, b) => a[0] - b[0] || a[1] - b[1]);
      const all = new CandidateColumns();
      const everyRoute = appendCandidatesAt(index, p, 0, radiusM, routes.length + 1, all);
      const gotAll: Found[] = [];
      for (let c = 0; c < everyRoute; c++) gotAll.push({ route: all.route[c], chainage: all.chainage[c], distance: all.distance[c], offset: all.offset[c] });
      expect(byDistance(gotAll)).toEqual(byDistance(bestOf(index, p, tree.neighbors(p.x[0], p.y[0], Infinity, reach), radiusM, Infinity)));
      expect(gotAll.slice(0, count)).toEqual(got);

      // 3. brute force: each candidate is its route's nearest point, and no route left out is nearer
      const brute = bruteForce(routes, lengths, fix);
      for (const g of got) {
        const b = brute[g.route];
        if (!(Math.abs(g.distance - b.distance) < 1e-6)) wrong.push(`query ${q}: route ${g.route} at ${g.distance} m, brute force ${b.distance} m`);
        // the index's frame holds each vertex to the ulp of 540° (lonDelta keeps the remainder formula's
        // numbers), about 1.2e-8 m: that turns a short segment by up to 2.4e-8 m / its length, and the foot of a
        // fix d metres away moves by d times that, never beyond the segment: at most √(d × 2.4e-8) m along it
        if (!(Math.abs(g.chainage - b.chainage) < 1e-6 + Math.sqrt(g.distance * 2.4e-8))) wrong.push(`query ${q}: route ${g.route} at chainage ${g.chainage}, brute force ${b.chainage}`);
        if (g.distance > 1e-6 && b.side !== 0 && Math.sign(g.offset) !== b.side) wrong.push(`query ${q}: route ${g.route} on side ${Math.sign(g.offset)}, brute force ${b.side}`);
      }
      for (let i = 1; i < got.length; i++) if (got[i].distance < got[i - 1].distance) wrong.push(`query ${q}: candidate ${i} nearer than ${i - 1}`);
      const returned = new Set(got.map((g) => g.route));
      const cutoff = got.length === max ? got[got.length - 1].distance : radiusM;
      brute.forEach((b, k) => {
        // a route within 1 µm of the cut-off may fall either way by rounding
        if (!returned.has(k) && Math.abs(b.distance - cutoff) > 1e-6 && b.distance < cutoff) wrong.push(`query ${q}: route ${k} at ${b.distance} m left out, cut-off ${cutoff} m`);
      });

      tally.queries++;
      if (count > 0) tally.found++;
      if (count === max && brute.filter((b) => b.distance <= radiusM).length > max) tally.truncated++;
      if (containsNode(index, minX, minY, maxX, maxY)) tally.contained++;
    }
    // the fixes exercised what they were meant to: hits, cut lists, and (on trees with inner nodes) swept nodes
    expect(wrong).toEqual([]);
    expect(tally.found).toBeGreaterThan(100);
    if (n > 1) expect(tally.truncated).toBeGreaterThan(10);
    if (index.segRoute.length > 16) expect(tally.contained).toBeGreaterThan(20);
  });
});
