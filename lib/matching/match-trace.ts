import { appendCandidates, CandidateColumns, makeCandidateIndex, metresPerDegree } from './candidates';
import { resolveMatchOptions, type Fix, type MatchOptions, type MatchResult, type ResolvedMatchOptions } from './match-types';
import { locatePositions, makeRouteNetwork, routeDistanceMatrix, type PositionColumns } from './route-distance';
import type { PlannedRouteInput, RouteGraph } from './types';
import { viterbiLayers } from './viterbi';

// Hidden-Markov map matching after Newson & Krumm (2009), "Hidden Markov Map Matching Through Noise and
// Sparseness", ACM SIGSPATIAL GIS, doi:10.1145/1653771.1653818.

const LOG_SQRT_2PI = 0.5 * Math.log(2 * Math.PI);

/**
 * Log of Newson & Krumm's emission density: a zero-mean Gaussian in the fix-to-candidate distance,
 * p = exp(−½(d/σ)²) / (σ√(2π)). At d = σ it is e^−½ ≈ 0.6065 of its value at d = 0.
 * `Math.exp(emissionLogProb(4, 4) - emissionLogProb(0, 4))` → 0.6065
 */
export function emissionLogProb(distanceM: number, sigmaM: number): number {
  const z = distanceM / sigmaM;
  return -0.5 * z * z - Math.log(sigmaM) - LOG_SQRT_2PI;
}

/**
 * Log of Newson & Krumm's transition density: exponential in how much the route distance between two
 * candidates differs from the great-circle distance between their fixes, p = exp(−|d_route − d_gc|/β) / β.
 * `transitionLogProb(12, 12, 3)` → −log 3
 */
export function transitionLogProb(routeM: number, greatCircleM: number, betaM: number): number {
  return -Math.abs(routeM - greatCircleM) / betaM - Math.log(betaM);
}

/** Fix positions in the candidate index's frame, and ground metres per frame unit at each fix. */
interface Plane {
  x: Float64Array;
  y: Float64Array;
  kx: Float64Array;
  ky: Float64Array;
}

function toPlane(fixes: Fix[], lon0: number, lat0: number, mx0: number, my0: number): Plane {
  const n = fixes.length;
  const p: Plane = { x: new Float64Array(n), y: new Float64Array(n), kx: new Float64Array(n), ky: new Float64Array(n) };
  fixes.forEach((f, i) => {
    const { mx, my } = metresPerDegree(f.lat);
    p.x[i] = (((((f.lon - lon0) % 360) + 540) % 360) - 180) * mx0;
    p.y[i] = (f.lat - lat0) * my0;
    (p.kx[i] = mx / mx0), (p.ky[i] = my / my0);
  });
  return p;
}

const dist = (p: Plane, i: number, j: number) => Math.hypot((p.x[i] - p.x[j]) * p.kx[i], (p.y[i] - p.y[j]) * p.ky[i]);

/**
 * Isolated spikes of one piece (indices into fixes, in order). A fix is a spike when it lies far from where
 * its neighbours put it: the reference is the time-interpolated position between i−1 and i+1 averaged with
 * that between i−2 and i+2 (noise of the reference ≈ σ/2, and a slowly varying bias cancels). Far means
 * beyond 3.5σ (white noise alone: < 0.5 % of fixes) AND, for timed fixes, beyond what maxSpeedMps allows
 * in the time to the nearer neighbour, or, without time, beyond gapMetres / 2. Raw fix-to-fix speeds are no
 * test at 1 Hz: 3–4 m noise alone makes consecutive handheld fixes "move" at 5 m/s.
 */
function spikes(fixes: Fix[], piece: number[], p: Plane, o: ResolvedMatchOptions): boolean[] {
  const out = piece.map(() => false);
  const at = (a: number, b: number, i: number): [number, number] => {
    const [fa, fb, fi] = [fixes[a], fixes[b], fixes[i]];
    const w = fa.t !== null && fb.t !== null && fi.t !== null && fb.t > fa.t ? (fi.t - fa.t) / (fb.t - fa.t) : 0.5;
    return [p.x[a] + w * (p.x[b] - p.x[a]), p.y[a] + w * (p.y[b] - p.y[a])];
  };
  for (let k = 1; k + 1 < piece.length; k++) {
    const i = piece[k];
    const [rx1, ry1] = at(piece[k - 1], piece[k + 1], i);
    let [rx, ry] = [rx1, ry1];
    if (k >= 2 && k + 2 < piece.length) {
      const [rx2, ry2] = at(piece[k - 2], piece[k + 2], i);
      [rx, ry] = [(rx1 + rx2) / 2, (ry1 + ry2) / 2];
    }
    const dev = Math.hypot((p.x[i] - rx) * p.kx[i], (p.y[i] - ry) * p.ky[i]);
    const [tp, ti, tn] = [fixes[piece[k - 1]].t, fixes[i].t, fixes[piece[k + 1]].t];
    const allow = tp !== null && ti !== null && tn !== null ? o.maxSpeedMps * Math.max(Math.min(ti - tp, tn - ti), 0) : o.gapMetres / 2;
    out[k] = dev > 3.5 * o.sigmaM && dev > allow;
  }
  return out;
}

/** Splits the track where consecutive fixes are more than gapSeconds (timed) or gapMetres (untimed) apart. */
function splitPieces(fixes: Fix[], p: Plane, o: ResolvedMatchOptions): number[][] {
  const pieces: number[][] = [];
  let cur: number[] = [];
  fixes.forEach((f, i) => {
    if (i > 0) {
      const g = fixes[i - 1];
      const gap = f.t !== null && g.t !== null ? Math.abs(f.t - g.t) > o.gapSeconds : dist(p, i - 1, i) > o.gapMetres;
      if (gap) pieces.push(cur), (cur = []);
    }
    cur.push(i);
  });
  if (cur.length > 0) pieces.push(cur);
  return pieces;
}

const grow = <T extends Int32Array | Float64Array>(from: T, to: T): T => (to.set(from), to);

/**
 * Drops candidates e^−32 (≈ 1e−14) or more less likely than the fix's best one. Within a handheld radius of
 * 4σ this never bites (at most e^−8); for an RTK survey (σ = 5 cm) it removes the far side of the street, so
 * a survey that jumps to a route it cannot reach by the network breaks the chain instead of pulling the
 * preceding points onto the wrong route. Candidates arrive nearest first: the fix's n candidates from
 * `first` on in `c`; returns how many to keep.
 */
function prune(c: CandidateColumns, first: number, n: number, sigmaM: number): number {
  if (n < 2) return n;
  const z0 = c.distance[first] / sigmaM;
  let kept = 1;
  while (kept < n && (c.distance[first + kept] / sigmaM) ** 2 - z0 * z0 <= 64) kept++;
  return kept;
}

/**
 * Matches a trace onto the planned routes: drops isolated spikes, splits at gaps, finds candidates within
 * the search radius, runs Viterbi per stretch, and reports each matched fix's route, chainage and signed
 * lateral offset. ≥ 3 consecutive fixes with no route in reach are an unmatched run (an unplanned stretch);
 * 1–2 such fixes are outliers. Fixes keep the given order, so survey points (t null) follow it too.
 * `matchTrace(fixes, routes, buildRouteGraph(routes), { sigmaM: 4 })` → `{ matched: [{ seq: 0, ref: 'N1', chainageM: 12.3, offsetM: 0.4, … }], unmatched: [], outliers: [], pieces: 1 }`
 */
export function matchTrace(fixes: Fix[], routes: PlannedRouteInput[], graph: RouteGraph, opts: MatchOptions): MatchResult {
  const o = resolveMatchOptions(opts);
  const index = makeCandidateIndex(routes);
  const net = makeRouteNetwork(graph, routes);
  const plane = toPlane(fixes, index.lon0, index.lat0, index.mx0, index.my0);
  const pieces = splitPieces(fixes, plane, o);
  const result: MatchResult = { matched: [], unmatched: [], outliers: [], pieces: pieces.length };
  const logBeta = Math.log(o.betaM);
  const outlierAt: number[] = [];
  // the current chain's candidates: those of its k-th fix are first[k] … first[k + 1] − 1 in cands
  const cands = new CandidateColumns();
  // the candidates as positions: each one's graph edge and its legs to the edge's from and to node, found once
  const pos: PositionColumns = { route: cands.route, chainage: cands.chainage, edge: new Int32Array(cands.route.length), leg0: new Float64Array(cands.route.length), leg1: new Float64Array(cands.route.length) };
  let chain: number[] = [];
  let first: number[] = [0];

  const runChain = () => {
    if (chain.length === 0) return;
    // Newson & Krumm drop transitions whose route is far longer than the straight line between the fixes
    const bound = new Float64Array(chain.length);
    const gc = new Float64Array(chain.length);
    for (let k = 1; k < chain.length; k++) (gc[k] = dist(plane, chain[k - 1], chain[k])), (bound[k] = 4 * gc[k] + 50);
    const counts = new Int32Array(chain.length);
    for (let k = 0; k < chain.length; k++) counts[k] = first[k + 1] - first[k];
    const { route, chainage, distance } = cands;
    const emissions = new Float64Array(first[chain.length]);
    for (let c = 0; c < emissions.length; c++) emissions[c] = emissionLogProb(distance[c], o.sigmaM);
    const betaM = o.betaM;
    const { path } = viterbiLayers(counts, emissions, (k, out) => {
      const size = counts[k - 1] * counts[k];
      routeDistanceMatrix(net, pos, first[k - 1], counts[k - 1], first[k], counts[k], bound[k], out);
      for (let x = 0; x < size; x++) out[x] = out[x] === Infinity ? -Infinity : -Math.abs(out[x] - gc[k]) / betaM - logBeta;
    });
    chain.forEach((i, k) => {
      const c = first[k] + path[k];
      result.matched.push({ seq: fixes[i].seq, ref: routes[route[c]].ref, chainageM: chainage[c], offsetM: cands.offset[c], distanceM: distance[c] });
    });
    // the fix that closed the chain may have its candidates in already: they start the next chain
    const [end, tail] = [first[chain.length], cands.length - first[chain.length]];
    for (const col of [cands.route, cands.chainage, cands.distance, cands.offset, pos.edge, pos.leg0, pos.leg1]) col.copyWithin(0, end, end + tail);
    (chain = []), (first = [0]), (cands.length = tail);
  };

  for (const piece of pieces) {
    const spike = spikes(fixes, piece, plane, o);
    let far: number[] = [];
    const closeFar = () => {
      if (far.length >= 3) {
        runChain();
        result.unmatched.push(far.map((i) => fixes[i]));
      } else for (const i of far) outlierAt.push(i);
      far = [];
    };
    piece.forEach((i, k) => {
      if (spike[k]) return void outlierAt.push(i);
      const at = cands.length;
      const n = prune(cands, at, appendCandidates(index, fixes[i], o.searchRadiusM, o.maxCandidates, cands), o.sigmaM);
      cands.length = at + n;
      if (n === 0) return void far.push(i);
      if (far.length > 0) closeFar();
      if (pos.edge.length < cands.route.length) {
        const size = cands.route.length;
        [pos.edge, pos.leg0, pos.leg1] = [grow(pos.edge, new Int32Array(size)), grow(pos.leg0, new Float64Array(size)), grow(pos.leg1, new Float64Array(size))];
      }
      pos.route = cands.route;
      pos.chainage = cands.chainage;
      locatePositions(net, pos, cands.length - n, cands.length);
      chain.push(i);
      first.push(cands.length);
    });
    closeFar();
    runChain();
  }
  // a spike inside a run of far fixes is found before the run closes: restore input order
  result.outliers = outlierAt.sort((a, b) => a - b).map((i) => fixes[i].seq);
  return result;
}
