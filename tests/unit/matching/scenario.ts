import geodesic from 'geographiclib-geodesic';
import type { Fix } from '@/lib/matching/match-types';
import type { LonLat, PlannedRouteInput } from '@/lib/matching/types';

// Synthetic matching scenarios with known truth. Geometry is drawn in metres east/north of an origin and
// placed on the ellipsoid with GeographicLib's direct problem; truth metrics use GeographicLib and the planar
// drawing only, never lib/matching, so the matcher is checked against independent arithmetic.

export const WGS84 = geodesic.Geodesic.WGS84;
export const ORIGIN: LonLat = [13.405, 52.52];
export type XY = [number, number];

import { mulberry32 } from '@/lib/records/seeded-random';

export { mulberry32 };

/** Standard normal deviate (Box–Muller). */
export const gaussian = (rng: () => number) => Math.sqrt(-2 * Math.log(1 - rng())) * Math.cos(2 * Math.PI * rng());

/** x metres east (along the geodesic due east), then y metres north. */
export function geo([x, y]: XY): LonLat {
  const e = WGS84.Direct(ORIGIN[1], ORIGIN[0], 90, x);
  const n = WGS84.Direct(e.lat2!, e.lon2!, 0, y);
  return [n.lon2!, n.lat2!];
}

/** Geodesic distance, GeographicLib Inverse. */
export const metres = (a: LonLat, b: LonLat) => WGS84.Inverse(a[1], a[0], b[1], b[0]).s12!;

const sub = (a: XY, b: XY): XY => [a[0] - b[0], a[1] - b[1]];
const norm = (a: XY) => Math.hypot(a[0], a[1]);

/** Planar polyline helpers in scenario metres. */
export function lengthXY(pts: XY[]): number {
  let s = 0;
  for (let i = 1; i < pts.length; i++) s += norm(sub(pts[i], pts[i - 1]));
  return s;
}

/** Point at distance s along the polyline and the left normal of its segment. */
export function alongXY(pts: XY[], s: number): { p: XY; left: XY } {
  let i = 0;
  for (; i < pts.length - 2; i++) {
    const l = norm(sub(pts[i + 1], pts[i]));
    if (s <= l) break;
    s -= l;
  }
  const d = sub(pts[i + 1], pts[i]);
  const l = norm(d);
  const t = Math.min(Math.max(s / l, 0), 1);
  return { p: [pts[i][0] + t * d[0], pts[i][1] + t * d[1]], left: [-d[1] / l, d[0] / l] };
}

/** Nearest point of the polyline to q: distance, segment, planar foot. */
export function nearestXY(pts: XY[], q: XY): { d: number; seg: number; foot: XY } {
  let best = { d: Infinity, seg: 0, foot: pts[0] };
  for (let i = 0; i + 1 < pts.length; i++) {
    const d = sub(pts[i + 1], pts[i]);
    const l2 = d[0] * d[0] + d[1] * d[1];
    const t = Math.min(Math.max(((q[0] - pts[i][0]) * d[0] + (q[1] - pts[i][1]) * d[1]) / l2, 0), 1);
    const foot: XY = [pts[i][0] + t * d[0], pts[i][1] + t * d[1]];
    const dist = norm(sub(q, foot));
    if (dist < best.d) best = { d: dist, seg: i, foot };
  }
  return best;
}

/** Geodesic chainage on the plan of the planar foot of q: Σ Inverse over the vertices before it, + the rest. */
export function truthChainage(plan: XY[], q: XY): number {
  const { seg, foot } = nearestXY(plan, q);
  let s = 0;
  for (let i = 0; i < seg; i++) s += metres(geo(plan[i]), geo(plan[i + 1]));
  return s + metres(geo(plan[seg]), geo(foot));
}

/** A polyline offset d metres to its left (mitre-free: each vertex moves along its averaged normal). */
export function offsetXY(pts: XY[], d: number): XY[] {
  return pts.map((p, i) => {
    const a = sub(pts[Math.min(i + 1, pts.length - 1)], pts[Math.max(i - 1, 0)]);
    const l = norm(a);
    return [p[0] - (a[1] / l) * d, p[1] + (a[0] / l) * d];
  });
}

/** Arc about (cx, cy) from angle a0 to a1 (radians) in steps of ≤ 5°. */
export function arcXY(cx: number, cy: number, r: number, a0: number, a1: number): XY[] {
  const n = Math.ceil(Math.abs(a1 - a0) / (Math.PI / 36));
  return Array.from({ length: n + 1 }, (_, i) => [cx + r * Math.cos(a0 + ((a1 - a0) * i) / n), cy + r * Math.sin(a0 + ((a1 - a0) * i) / n)] as XY);
}

export interface TruthFix {
  fix: Fix;
  /** the noise-free position, planar and on the ellipsoid */
  truthXY: XY;
  truth: LonLat;
  /** the route being walked/surveyed; null on the unplanned extension */
  ref: string | null;
  outlier: boolean;
}

/** The white noise + Ornstein–Uhlenbeck bias + spike outliers of a handheld receiver at 1 Hz. */
export function handheldNoise(rng: () => number, opts: { whiteM: number; biasM: number; tauS: number; outlierRate: number }) {
  let [bx, by] = [0, 0];
  const decay = Math.exp(-1 / opts.tauS);
  const kick = opts.biasM * Math.sqrt(1 - decay * decay); // keeps the stationary std at biasM
  let lastOutlier = false;
  return (): { dx: number; dy: number; outlier: boolean } => {
    bx = bx * decay + kick * gaussian(rng);
    by = by * decay + kick * gaussian(rng);
    let dx = bx + opts.whiteM * gaussian(rng);
    let dy = by + opts.whiteM * gaussian(rng);
    const outlier = !lastOutlier && rng() < opts.outlierRate;
    if (outlier) {
      const [r, a] = [15 + 25 * rng(), 2 * Math.PI * rng()];
      (dx += r * Math.cos(a)), (dy += r * Math.sin(a));
    }
    lastOutlier = outlier;
    return { dx, dy, outlier };
  };
}

const H = 3.25; // half the distance between the two sides of a street: 6.5 m apart

export interface StreetScenario {
  routes: PlannedRouteInput[];
  plan: Map<string, XY[]>;
  /** the as-built line of each route, drawn at 1 m steps of plan chainage */
  asBuilt: Map<string, XY[]>;
  handheld: TruthFix[];
  rtk: TruthFix[];
  /** t of the last fix before and the first after the signal gap */
  gap: [number, number];
  extension: { from: XY; to: XY; lengthM: number };
  detour: { ref: string; fromM: number; toM: number; amplitudeM: number };
}

/**
 * A street with both sides planned (6.5 m apart) bending through a 60° curve, two crossings, two side streets
 * on T-junctions, an as-built 0.2–1 m off the plan with a 5 m detour over 25 m, a handheld walk with a 40 s
 * gap and a stretch walked back over, RTK points every 2 m, and a 40 m unplanned extension off a dead end.
 * `streetScenario(7).handheld.length` → ~900
 */
export function streetScenario(seed: number): StreetScenario {
  const rng = mulberry32(seed);
  const centre: XY[] = [[0, 0], [100, 0], [200, 0], ...arcXY(200, 60, 60, -Math.PI / 2, -Math.PI / 6).slice(1), [200 + 60 * Math.cos(-Math.PI / 6) + 150 * Math.cos(Math.PI / 3), 60 + 60 * Math.sin(-Math.PI / 6) + 150 * Math.sin(Math.PI / 3)]];
  const n1 = offsetXY(centre, H);
  const s1 = offsetXY(centre, -H);
  const cross = (s: number): XY[] => [alongXY(n1, s).p, alongXY(s1, s).p];
  const x2s = 200 + (60 * Math.PI) / 3 + 90;
  const plan = new Map<string, XY[]>([
    ['N1', n1],
    ['S1', s1],
    ['X1', cross(100)],
    ['X2', cross(x2s)],
    ['V1', [alongXY(n1, 60).p, [60, 80], ...arcXY(100, 80, 40, Math.PI, Math.PI / 2).slice(1), [160, 120]]],
    ['V2', [alongXY(s1, 160).p, [160, -80], [200, -120]]],
  ]);
  const routes: PlannedRouteInput[] = [...plan].map(([ref, pts]) => ({ ref, street: ref.startsWith('X') ? null : 'Hauptstraße', ducts: '7x14mm', kind: ref.startsWith('X') ? 'crossing' : 'street', coords: pts.map(geo) }));
  const detour = { ref: 'N1', fromM: 120, toM: 145, amplitudeM: 5 };
  const asBuilt = new Map<string, XY[]>();
  for (const [ref, pts] of plan) {
    const [phase, sign, len] = [2 * Math.PI * rng(), rng() < 0.5 ? -1 : 1, lengthXY(pts)];
    const line: XY[] = [];
    for (let s = 0; ; s = Math.min(s + 1, len)) {
      const { p, left } = alongXY(pts, s);
      let off = sign * (0.6 + 0.4 * Math.sin((2 * Math.PI * s) / 70 + phase)); // 0.2–1 m
      if (ref === detour.ref && s > detour.fromM && s < detour.toM) off += detour.amplitudeM * Math.sin((Math.PI * (s - detour.fromM)) / (detour.toM - detour.fromM)) ** 2;
      line.push([p[0] + left[0] * off, p[1] + left[1] * off]);
      if (s >= len) break;
    }
    asBuilt.set(ref, line);
  }
  const v2 = plan.get('V2')!;
  const dir = sub(v2[2], v2[1]);
  const u: XY = [dir[0] / norm(dir), dir[1] / norm(dir)];
  const extension = { from: v2[2], to: [v2[2][0] + 40 * u[0], v2[2][1] + 40 * u[1]] as XY, lengthM: 40 };
  const lenOf = (ref: string) => lengthXY(plan.get(ref)!);
  type Leg = [string | null, number, number];
  const legs: Leg[] = [['N1', 0, 100], ['X1', 0, lenOf('X1')], ['S1', 100, 160], ['V2', 0, lenOf('V2')], [null, 0, 40], [null, 40, 0], ['V2', lenOf('V2'), 0], ['S1', 160, x2s], ['X2', lenOf('X2'), 0], ['N1', x2s, 110], ['N1', 110, 300]];
  const at = (ref: string | null, s: number): XY => (ref === null ? [extension.from[0] + s * u[0], extension.from[1] + s * u[1]] : alongXY(asBuilt.get(ref)!, s).p);

  const noise = handheldNoise(rng, { whiteM: 3.5, biasM: 1, tauS: 60, outlierRate: 0.01 });
  const handheld: TruthFix[] = [];
  const t0 = 1_762_156_800;
  let t = 0;
  const gapAt = 300; // seconds into the walk: on S1 between V2 and X2
  for (const [ref, a, b] of legs) {
    const steps = Math.max(1, Math.round(Math.abs(b - a) / 1.3));
    for (let i = 0; i < steps; i++, t++) {
      const q = at(ref, a + ((b - a) * i) / steps);
      const n = noise();
      if (t >= gapAt && t < gapAt + 40) continue;
      const fix = { ...lonLatFix(geo([q[0] + n.dx, q[1] + n.dy])), t: t0 + t, seq: handheld.length };
      handheld.push({ fix, truthXY: q, truth: geo(q), ref, outlier: n.outlier });
    }
  }
  const rtk: TruthFix[] = [];
  const rtkLegs: Leg[] = [['N1', 0, lenOf('N1')], ['S1', lenOf('S1'), 0], ['X1', 0, lenOf('X1')], ['V2', 0, lenOf('V2')], [null, 2, 40]];
  for (const [ref, a, b] of rtkLegs) {
    const steps = Math.max(1, Math.round(Math.abs(b - a) / 2));
    for (let i = 0; i <= steps; i++) {
      const q = at(ref, a + ((b - a) * i) / steps);
      const fix = { ...lonLatFix(geo([q[0] + 0.02 * gaussian(rng), q[1] + 0.02 * gaussian(rng)])), t: null, seq: 10_000 + rtk.length };
      rtk.push({ fix, truthXY: q, truth: geo(q), ref, outlier: false });
    }
  }
  return { routes, plan, asBuilt, handheld, rtk, gap: [t0 + gapAt - 1, t0 + gapAt + 40], extension, detour };
}

const lonLatFix = ([lon, lat]: LonLat) => ({ lon, lat });

export interface GridScenario {
  routes: PlannedRouteInput[];
  plan: Map<string, XY[]>;
  totalLengthM: number;
  handheld: TruthFix[];
}

/**
 * A G×G grid of 80 m blocks: both sides of every street as routes (ringing each block, joined at its
 * corners), a mid-block crossing on every street, and 5–10 m house leads on T-junctions; 7 blocks give
 * ~2,000 routes and ~30 km. The walker circles block rings at 1.3 m/s and crosses to the next block.
 * `gridScenario(1, { blocks: 7, fixes: 1000 }).routes.length` → ~2000
 */
export function gridScenario(seed: number, opts: { blocks: number; fixes: number; leads?: number }): GridScenario {
  const rng = mulberry32(seed);
  const [G, B] = [opts.blocks, 80];
  const L = B - 2 * H;
  const plan = new Map<string, XY[]>();
  for (let i = 0; i < G; i++) {
    for (let j = 0; j <= G; j++) {
      const [xa, xb, y] = [i * B + H, (i + 1) * B - H, j * B];
      plan.set(`E${i}_${j}n`, [[xa, y + H], [xb, y + H]]);
      plan.set(`E${i}_${j}s`, [[xa, y - H], [xb, y - H]]);
      plan.set(`XE${i}_${j}`, [[(i + 0.5) * B, y + H], [(i + 0.5) * B, y - H]]);
      const [ya, yb, x] = [i * B + H, (i + 1) * B - H, j * B];
      plan.set(`N${j}_${i}e`, [[x + H, ya], [x + H, yb]]);
      plan.set(`N${j}_${i}w`, [[x - H, ya], [x - H, yb]]);
      plan.set(`XN${j}_${i}`, [[x - H, (i + 0.5) * B], [x + H, (i + 0.5) * B]]);
    }
  }
  const sides = [...plan.keys()].filter((k) => !k.startsWith('X'));
  const leads = opts.leads ?? 2000 - plan.size;
  for (let k = 0; k < leads; k++) {
    const ref = sides[k % sides.length];
    const [a, b] = plan.get(ref)!;
    // leads sit off the middle crossing and the corners, into the block (or away from the outer streets)
    let s = 3 + (L / 2 - 6) * rng();
    if (rng() < 0.5) s = L - s;
    const side = ref.endsWith('n') || ref.endsWith('e') ? 1 : -1;
    const vertical = ref.startsWith('N');
    const start: XY = vertical ? [a[0], a[1] + s] : [a[0] + s, a[1]];
    const len = 5 + 5 * rng();
    plan.set(`D${k}`, [start, vertical ? [start[0] + side * len, start[1]] : [start[0], start[1] + side * len]]);
  }
  const routes: PlannedRouteInput[] = [...plan].map(([ref, pts]) => ({ ref, street: null, ducts: null, kind: ref.startsWith('X') ? 'crossing' : 'street', coords: pts.map(geo) }));
  let totalLengthM = 0;
  for (const pts of plan.values()) totalLengthM += lengthXY(pts);

  // ring of block (bi, bj), counter-clockwise: side k runs from corner k to corner k + 1
  const corner = (bi: number, bj: number, k: number): XY => [bi * B + (k === 1 || k === 2 ? B - H : H), bj * B + (k >= 2 ? B - H : H)];
  const sideRef = (bi: number, bj: number, k: number) => [`E${bi}_${bj}n`, `N${bi + 1}_${bj}w`, `E${bi}_${bj + 1}s`, `N${bi}_${bj}e`][k];
  const across = (bi: number, bj: number, k: number): [number, number, string] => [[bi, bj - 1, `XE${bi}_${bj}`], [bi + 1, bj, `XN${bi + 1}_${bj}`], [bi, bj + 1, `XE${bi}_${bj + 1}`], [bi - 1, bj, `XN${bi}_${bj}`]][k] as [number, number, string];
  const noise = handheldNoise(rng, { whiteM: 3.5, biasM: 1, tauS: 60, outlierRate: 0.01 });
  const handheld: TruthFix[] = [];
  let [bi, bj, u, dirn] = [Math.floor(G / 2), Math.floor(G / 2), 10, 1];
  let crossing: { from: XY; to: XY; ref: string; s: number } | null = null;
  const t0 = 1_762_156_800;
  for (let t = 0; handheld.length < opts.fixes; t++) {
    let q: XY;
    let ref: string;
    if (crossing) {
      const f = Math.min(crossing.s / 2 / H, 1);
      q = [crossing.from[0] + f * (crossing.to[0] - crossing.from[0]), crossing.from[1] + f * (crossing.to[1] - crossing.from[1])];
      ref = crossing.ref;
      crossing.s += 1.3;
      if (crossing.s > 2 * H) crossing = null;
    } else {
      const k = Math.floor(u / L) % 4;
      const f = (u - k * L) / L;
      const [a, b] = [corner(bi, bj, k), corner(bi, bj, (k + 1) % 4)];
      q = [a[0] + f * (b[0] - a[0]), a[1] + f * (b[1] - a[1])];
      ref = sideRef(bi, bj, k);
      const next = (((u + dirn * 1.3) % (4 * L)) + 4 * L) % (4 * L);
      // passing a side's middle: maybe cross the street to the facing block
      const mid = k * L + L / 2;
      const passes = Math.floor(next / L) === k && (u - mid) * (next - mid) <= 0 && u !== mid;
      const [ni, nj, xref] = across(bi, bj, k);
      if (passes && ni >= 0 && nj >= 0 && ni < G && nj < G && rng() < 0.3) {
        const kk = (k + 2) % 4;
        const to: XY = [(corner(ni, nj, kk)[0] + corner(ni, nj, (kk + 1) % 4)[0]) / 2, (corner(ni, nj, kk)[1] + corner(ni, nj, (kk + 1) % 4)[1]) / 2];
        crossing = { from: [(a[0] + b[0]) / 2, (a[1] + b[1]) / 2], to, ref: xref, s: 0 };
        [bi, bj, u, dirn] = [ni, nj, kk * L + L / 2, rng() < 0.5 ? 1 : -1];
      } else u = rng() < 0.003 ? u : next;
      if (rng() < 0.003) dirn = -dirn; // now and then the walker turns back over the same stretch
    }
    const n = noise();
    const fix = { ...lonLatFix(geo([q[0] + n.dx, q[1] + n.dy])), t: t0 + t, seq: handheld.length };
    handheld.push({ fix, truthXY: q, truth: geo(q), ref, outlier: n.outlier });
  }
  return { routes, plan, totalLengthM, handheld };
}

/**
 * The scenario position of a WGS 84 point: the inverse of `geo`, by Newton steps on GeographicLib's Inverse
 * (each step moves the guess by the geodesic from geo(guess) to p, split into east and north); converges to
 * well under a millimetre in three steps over a few kilometres.
 * `xyOf(geo([120, -40]))` → `[120, -40]` (±1e-6)
 */
export function xyOf(p: LonLat): XY {
  const step = (from: LonLat): XY => {
    const r = WGS84.Inverse(from[1], from[0], p[1], p[0]);
    const a = (r.azi1! * Math.PI) / 180;
    return [r.s12! * Math.sin(a), r.s12! * Math.cos(a)];
  };
  let q = step(ORIGIN);
  for (let i = 0; i < 4; i++) {
    const d = step(geo(q));
    q = [q[0] + d[0], q[1] + d[1]];
    if (Math.hypot(d[0], d[1]) < 1e-7) break;
  }
  return q;
}

/** Union of intervals, sorted, overlaps merged. */
export function unionIntervals(xs: [number, number][]): [number, number][] {
  const out: [number, number][] = [];
  for (const [a, b] of [...xs].map(([a, b]) => [Math.min(a, b), Math.max(a, b)] as [number, number]).sort((p, q) => p[0] - q[0])) {
    const last = out[out.length - 1];
    if (last && a <= last[1]) last[1] = Math.max(last[1], b);
    else out.push([a, b]);
  }
  return out;
}

/** Metres of [a, b] covered by the (merged) intervals. */
export function overlapM(intervals: [number, number][], a: number, b: number): number {
  return intervals.reduce((n, [p, q]) => n + Math.max(0, Math.min(b, q) - Math.max(a, p)), 0);
}

export interface ProjectScenario {
  routes: PlannedRouteInput[];
  plan: Map<string, XY[]>;
  asBuilt: Map<string, XY[]>;
  handheld: TruthFix[];
  rtk: TruthFix[];
  /** what was really laid on each planned route: geodesic plan chainage intervals (GeographicLib) */
  built: Map<string, [number, number][]>;
  /** the part of it that the RTK survey measured */
  rtkBuilt: Map<string, [number, number][]>;
  /** the same, as planar plan chainage (index into the as-built line's 1 m vertices) */
  builtPlanar: Map<string, [number, number][]>;
  gap: [number, number];
  extension: { from: XY; to: XY; lengthM: number };
  detour: { ref: string; fromM: number; toM: number; amplitudeM: number };
  /** the true trench at planar plan chainage c of a route (ref null: c metres along the extension) */
  at(ref: string | null, c: number): XY;
}

/**
 * The street of `streetScenario` (both sides 6.5 m apart, a 60° curve, two crossings, two T-junctions,
 * a 5 m detour over 25 m on N1, a 40 m unplanned extension off V2) as one project would record it:
 * a handheld walk (1 Hz, σ 3.5 m, OU bias 1 m / 60 s, 1 % spikes of 15–40 m, a 40 s signal gap on S1,
 * N1 walked back and forth over 100–300 m) and an RTK survey of N1 from 250 m to its end. S1 before the
 * X1 crossing and after X2, and all of V1, are left unbuilt, so only N1 is laid there.
 * `projectScenario(1).built.get('S1')` → `[[100.0…, 352.8…]]`
 */
export function projectScenario(seed: number): ProjectScenario {
  const { routes, plan, asBuilt, extension, detour } = streetScenario(seed);
  const rng = mulberry32(seed * 7919 + 17);
  const len = (ref: string) => lengthXY(plan.get(ref)!);
  const dir: XY = [(extension.to[0] - extension.from[0]) / extension.lengthM, (extension.to[1] - extension.from[1]) / extension.lengthM];
  // the as-built line has a vertex at each metre of planar plan chainage, the last one at the route's end
  const at = (ref: string | null, c: number): XY => {
    if (ref === null) return [extension.from[0] + c * dir[0], extension.from[1] + c * dir[1]];
    const line = asBuilt.get(ref)!;
    const i = Math.min(Math.max(Math.floor(c), 0), line.length - 2);
    const span = i + 1 === line.length - 1 ? len(ref) - i : 1;
    const f = Math.min(Math.max((c - i) / span, 0), 1);
    return [line[i][0] + f * (line[i + 1][0] - line[i][0]), line[i][1] + f * (line[i + 1][1] - line[i][1])];
  };
  const x2s = 200 + (60 * Math.PI) / 3 + 90; // where X2 crosses, as streetScenario draws it
  type Leg = [string | null, number, number];
  const walk: Leg[] = [['N1', 0, 100], ['X1', 0, len('X1')], ['S1', 100, 160], ['V2', 0, len('V2')], [null, 0, extension.lengthM], [null, extension.lengthM, 0], ['V2', len('V2'), 0], ['S1', 160, x2s], ['X2', len('X2'), 0], ['N1', x2s, 100], ['N1', 100, 300]];
  const survey: Leg[] = [['N1', 250, len('N1')]];
  const noise = handheldNoise(rng, { whiteM: 3.5, biasM: 1, tauS: 60, outlierRate: 0.01 });
  const t0 = 1_762_243_200;
  const handheld: TruthFix[] = [];
  let t = 0;
  let gap: [number, number] = [0, 0];
  for (const [k, [ref, a, b]] of walk.entries()) {
    const steps = Math.max(1, Math.round(Math.abs(b - a) / 1.3));
    for (let i = 0; i < steps; i++, t++) {
      const q = at(ref, a + ((b - a) * i) / steps);
      const n = noise();
      // 40 s without signal on S1, from about 210 m: the walker went on and so did the trench
      if (k === 7 && i >= 40 && i < 80) continue;
      if (k === 7 && i === 80) gap = [handheld[handheld.length - 1].fix.t!, t0 + t];
      const fix = { ...lonLatFix(geo([q[0] + n.dx, q[1] + n.dy])), t: t0 + t, seq: handheld.length };
      handheld.push({ fix, truthXY: q, truth: geo(q), ref, outlier: n.outlier });
    }
  }
  const rtk: TruthFix[] = [];
  for (const [ref, a, b] of survey) {
    const steps = Math.max(1, Math.round(Math.abs(b - a) / 2));
    for (let i = 0; i <= steps; i++) {
      const q = at(ref, a + ((b - a) * i) / steps);
      const fix = { ...lonLatFix(geo([q[0] + 0.02 * gaussian(rng), q[1] + 0.02 * gaussian(rng)])), t: null, seq: 100_000 + rtk.length };
      rtk.push({ fix, truthXY: q, truth: geo(q), ref, outlier: false });
    }
  }
  const planar = (legs: Leg[]) => {
    const m = new Map<string, [number, number][]>();
    for (const [ref, a, b] of legs) if (ref !== null) m.set(ref, [...(m.get(ref) ?? []), [a, b]]);
    return new Map([...m].map(([ref, xs]) => [ref, unionIntervals(xs)]));
  };
  const geodesicChainage = (ref: string, c: number) => truthChainage(plan.get(ref)!, alongXY(plan.get(ref)!, c).p);
  const toGeodesic = (m: Map<string, [number, number][]>) => new Map([...m].map(([ref, xs]) => [ref, xs.map(([a, b]) => [geodesicChainage(ref, a), geodesicChainage(ref, b)] as [number, number])]));
  const builtPlanar = planar([...walk, ...survey]);
  return { routes, plan, asBuilt, handheld, rtk, built: toGeodesic(builtPlanar), rtkBuilt: toGeodesic(planar(survey)), builtPlanar, gap, extension, detour, at };
}
