import { appendCandidates, CandidateColumns, makeCandidateIndex, metresPerDegree, type CandidateIndex } from './candidates';
import { resolveMatchOptions, type Fix, type MatchOptions, type MatchResult, type ResolvedMatchOptions } from './match-types';
import { locatePositions, makeRouteNetwork, routeDistanceBetween, type PositionColumns, type RouteNetwork } from './route-distance';
import type { PlannedRouteInput, RouteGraph } from './types';
import { viterbiPruned } from './viterbi';

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
  for (let i = 0; i < n; i++) {
    const f = fixes[i];
    const { mx, my } = metresPerDegree(f.lat);
    p.x[i] = (((((f.lon - lon0) % 360) + 540) % 360) - 180) * mx0;
    p.y[i] = (f.lat - lat0) * my0;
    (p.kx[i] = mx / mx0), (p.ky[i] = my / my0);
  }
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
  // the time-interpolated position between fixes a and b at fix i's time (halfway without times)
  let rx = 0;
  let ry = 0;
  const at = (a: number, b: number, i: number) => {
    const [ta, tb, ti] = [fixes[a].t, fixes[b].t, fixes[i].t];
    const w = ta !== null && tb !== null && ti !== null && tb > ta ? (ti - ta) / (tb - ta) : 0.5;
    rx = p.x[a] + w * (p.x[b] - p.x[a]);
    ry = p.y[a] + w * (p.y[b] - p.y[a]);
  };
  for (let k = 1; k + 1 < piece.length; k++) {
    const i = piece[k];
    at(piece[k - 1], piece[k + 1], i);
    let [x, y] = [rx, ry];
    if (k >= 2 && k + 2 < piece.length) {
      at(piece[k - 2], piece[k + 2], i);
      x = (x + rx) / 2;
      y = (y + ry) / 2;
    }
    const dev = Math.hypot((p.x[i] - x) * p.kx[i], (p.y[i] - y) * p.ky[i]);
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

/** The planned routes prepared for matching: the candidate index and the network for route distances. */
export interface MatchNetwork {
  index: CandidateIndex;
  net: RouteNetwork;
}

/**
 * Builds the candidate index and route network once, for every trace of a reconciliation (their caches of
 * route distances carry over from trace to trace; they hold exact distances, so results do not change).
 * `matchTrace(fixes, routes, graph, { sigmaM: 4 }, prepareMatchNetwork(routes, graph))`
 */
export function prepareMatchNetwork(routes: PlannedRouteInput[], graph: RouteGraph): MatchNetwork {
  return { index: makeCandidateIndex(routes), net: makeRouteNetwork(graph, routes) };
}

/**
 * Matches a trace onto the planned routes: drops isolated spikes, splits at gaps, finds candidates within
 * the search radius, runs Viterbi per stretch, and reports each matched fix's route, chainage and signed
 * lateral offset. ≥ 3 consecutive fixes with no route in reach are an unmatched run (an unplanned stretch);
 * 1–2 such fixes are outliers. Fixes keep the given order, so survey points (t null) follow it too.
 * `matchTrace(fixes, routes, buildRouteGraph(routes), { sigmaM: 4 })` → `{ matched: [{ seq: 0, ref: 'N1', chainageM: 12.3, offsetM: 0.4, … }], unmatched: [], outliers: [], pieces: 1 }`
 */
export function matchTrace(fixes: Fix[], routes: PlannedRouteInput[], graph: RouteGraph, opts: MatchOptions, prepared?: MatchNetwork): MatchResult {
  const o = resolveMatchOptions(opts);
  const { index, net } = prepared ?? prepareMatchNetwork(routes, graph);
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

  /**
   * Viterbi over layers of the current chain: layer k holds the candidates at[k] … at[k] + n[k] − 1 of fix
   * fx[k]. Returns the chosen candidate of each layer.
   */
  const solve = (at: ArrayLike<number>, n: ArrayLike<number>, fx: ArrayLike<number>): Int32Array => {
    const m = fx.length;
    // Newson & Krumm drop transitions whose route is far longer than the straight line between the fixes
    const gc = new Float64Array(m);
    const bound = new Float64Array(m);
    for (let k = 1; k < m; k++) (gc[k] = dist(plane, fx[k - 1], fx[k])), (bound[k] = 4 * gc[k] + 50);
    let total = 0;
    for (let k = 0; k < m; k++) total += n[k];
    const emissions = new Float64Array(total);
    for (let k = 0, e = 0; k < m; k++) for (let j = 0; j < n[k]; j++) emissions[e++] = emissionLogProb(cands.distance[at[k] + j], o.sigmaM);
    const betaM = o.betaM;
    const { route, chainage } = cands;
    const { edge, leg0, leg1 } = pos;
    // route distances are the costly part: asked for only where a transition can still change the best path
    const { path } = viterbiPruned(n, emissions, -logBeta, (k, i, j) => {
      const [x, y] = [at[k - 1] + i, at[k] + j];
      const d = routeDistanceBetween(net, route[x], chainage[x], edge[x], leg0[x], leg1[x], route[y], chainage[y], edge[y], leg0[y], leg1[y], bound[k]);
      return d === Infinity ? -Infinity : -Math.abs(d - gc[k]) / betaM - logBeta;
    });
    for (let k = 0; k < m; k++) path[k] += at[k];
    return path;
  };

  /**
   * The skipped fixes between kept layers ka and kb when the kept ones chose different routes (a turn at a
   * junction): Viterbi over just their candidates on those two routes, both ends fixed. False, with nothing
   * chosen, when a skipped fix has a candidate on neither or the two routes do not connect within reach.
   */
  const between = (ka: number, kb: number, chosen: Int32Array): boolean => {
    const { route, chainage, distance } = cands;
    const [ca, cb] = [chosen[ka], chosen[kb]];
    const [r1, r2] = [route[ca], route[cb]];
    const span = kb - ka + 1;
    // two states a layer at most (a fix has one candidate per route): state s of layer j is states[2j + s]
    const states = new Int32Array(2 * span).fill(-1);
    const score = new Float64Array(2 * span).fill(-Infinity);
    const back = new Int8Array(2 * span);
    (states[0] = ca), (score[0] = 0);
    for (let j = 1; j < span; j++) {
      const k = ka + j;
      if (j === span - 1) states[2 * j] = cb;
      else {
        let s = 2 * j;
        for (let c = first[k]; c < first[k + 1]; c++) if (route[c] === r1 || route[c] === r2) states[s++] = c;
        if (s === 2 * j) return false;
      }
      const gc = dist(plane, chain[k - 1], chain[k]);
      const bound = 4 * gc + 50;
      let reached = false;
      for (let t = 0; t < 2; t++) {
        const y = states[2 * j + t];
        if (y < 0) continue;
        const e = j === span - 1 ? 0 : emissionLogProb(distance[y], o.sigmaM);
        for (let p = 0; p < 2; p++) {
          const x = states[2 * (j - 1) + p];
          if (x < 0 || score[2 * (j - 1) + p] === -Infinity) continue;
          const d = routeDistanceBetween(net, route[x], chainage[x], pos.edge[x], pos.leg0[x], pos.leg1[x], route[y], chainage[y], pos.edge[y], pos.leg0[y], pos.leg1[y], bound);
          if (d === Infinity) continue;
          const v = score[2 * (j - 1) + p] - Math.abs(d - gc) / o.betaM - logBeta + e;
          if (v > score[2 * j + t]) (score[2 * j + t] = v), (back[2 * j + t] = p);
        }
        if (score[2 * j + t] > -Infinity) reached = true;
      }
      if (!reached) return false;
    }
    for (let j = span - 1, t = 0; j > 0; t = back[2 * j + t], j--) if (j < span - 1) chosen[ka + j] = states[2 * j + t];
    return true;
  };

  const runChain = () => {
    const L = chain.length;
    if (L === 0) return;
    const { route, chainage, distance } = cands;
    // Newson & Krumm (2009, §4.1) leave out the fixes within 2σ of the last one kept: until the walker has
    // moved further than the noise, a fix adds little to where the route goes. They skip the recursion here
    // and are placed afterwards, on the route the kept fixes either side of them chose.
    const keep: number[] = [0];
    for (let k = 1; k < L; k++) if (k === L - 1 || dist(plane, chain[keep[keep.length - 1]], chain[k]) >= o.thinM) keep.push(k);
    const chosen = new Int32Array(L);
    const picked = solve(keep.map((k) => first[k]), keep.map((k) => first[k + 1] - first[k]), keep.map((k) => chain[k]));
    keep.forEach((k, g) => (chosen[k] = picked[g]));
    for (let g = 0; g + 1 < keep.length; g++) {
      const [ka, kb] = [keep[g], keep[g + 1]];
      if (kb - ka < 2) continue;
      // both neighbours on one route, and the skipped fixes have a candidate on it: that one
      const r = route[chosen[ka]];
      let same = route[chosen[kb]] === r;
      for (let k = ka + 1; same && k < kb; k++) {
        let c = first[k];
        while (c < first[k + 1] && route[c] !== r) c++;
        if (c < first[k + 1]) chosen[k] = c;
        else same = false;
      }
      if (same || between(ka, kb, chosen)) continue;
      // otherwise: Viterbi over every candidate of the skipped fixes, both ends fixed
      const span = kb - ka + 1;
      const at = new Int32Array(span);
      const n = new Int32Array(span);
      const fx = new Int32Array(span);
      for (let j = 0; j < span; j++) {
        const k = ka + j;
        fx[j] = chain[k];
        [at[j], n[j]] = j === 0 || j === span - 1 ? [chosen[k], 1] : [first[k], first[k + 1] - first[k]];
      }
      const inner = solve(at, n, fx);
      for (let j = 1; j + 1 < span; j++) chosen[ka + j] = inner[j];
    }
    chain.forEach((i, k) => {
      const c = chosen[k];
      result.matched.push({ seq: fixes[i].seq, ref: routes[route[c]].ref, chainageM: chainage[c], offsetM: cands.offset[c], distanceM: distance[c] });
    });
    // the fix that closed the chain may have its candidates in already: they start the next chain
    const [end, tail] = [first[L], cands.length - first[L]];
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
