import { appendCandidatesAt, CandidateColumns, makeCandidateIndex, projectInFrame, toFrameInto, type CandidateIndex, type FramePoints } from './candidates';
import { resolveMatchOptions, type Fix, type MatchOptions, type MatchResult, type ResolvedMatchOptions } from './match-types';
import { locatePositions, makeRouteNetwork, positionDistanceInto, type PositionColumns, type RouteNetwork } from './route-distance';
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

/** Fix positions in the candidate index's frame, and ground metres per frame unit at each fix. */
function toPlane(fixes: Fix[], index: CandidateIndex): FramePoints {
  const n = fixes.length;
  const p: FramePoints = { x: new Float64Array(n), y: new Float64Array(n), kx: new Float64Array(n), ky: new Float64Array(n) };
  for (let i = 0; i < n; i++) toFrameInto(index, fixes[i].lon, fixes[i].lat, p, i);
  return p;
}

// (hot paths avoid Math.hypot and array destructuring: V8 boxes the one's result and may allocate the other)
const dist = (p: FramePoints, i: number, j: number) => {
  const dx = (p.x[i] - p.x[j]) * p.kx[i];
  const dy = (p.y[i] - p.y[j]) * p.ky[i];
  return Math.sqrt(dx * dx + dy * dy);
};

/**
 * Isolated spikes of one piece (indices into fixes, in order), a flag per fix (1: a spike). A fix is a spike when it lies far from where
 * its neighbours put it: the reference is the time-interpolated position between i−1 and i+1 averaged with
 * that between i−2 and i+2 (noise of the reference ≈ σ/2, and a slowly varying bias cancels). Far means
 * beyond 3.5σ (white noise alone: under 1 % of fixes, as the deviation from the reference has 1.25σ² per
 * axis) AND, for timed fixes, beyond what maxSpeedMps allows in the time to the nearer neighbour, or,
 * without time, beyond gapMetres / 2. Raw fix-to-fix speeds are no
 * test at 1 Hz: 3–4 m noise alone makes consecutive handheld fixes "move" at 5 m/s.
 */
function spikes(fixes: Fix[], piece: number[], p: FramePoints, o: ResolvedMatchOptions): Uint8Array {
  const out = new Uint8Array(piece.length);
  // the time-interpolated position between fixes a and b at fix i's time (halfway without times), as a
  // weight: a closure setting captured numbers would box each of them
  const weight = (a: number, b: number, i: number) => {
    const ta = fixes[a].t;
    const tb = fixes[b].t;
    const ti = fixes[i].t;
    return ta !== null && tb !== null && ti !== null && tb > ta ? (ti - ta) / (tb - ta) : 0.5;
  };
  for (let k = 1; k + 1 < piece.length; k++) {
    const i = piece[k];
    let a = piece[k - 1];
    let b = piece[k + 1];
    let w = weight(a, b, i);
    let x = p.x[a] + w * (p.x[b] - p.x[a]);
    let y = p.y[a] + w * (p.y[b] - p.y[a]);
    if (k >= 2 && k + 2 < piece.length) {
      a = piece[k - 2];
      b = piece[k + 2];
      w = weight(a, b, i);
      x = (x + (p.x[a] + w * (p.x[b] - p.x[a]))) / 2;
      y = (y + (p.y[a] + w * (p.y[b] - p.y[a]))) / 2;
    }
    const ex = (p.x[i] - x) * p.kx[i];
    const ey = (p.y[i] - y) * p.ky[i];
    const dev = Math.sqrt(ex * ex + ey * ey);
    const tp = fixes[piece[k - 1]].t;
    const ti = fixes[i].t;
    const tn = fixes[piece[k + 1]].t;
    const allow = tp !== null && ti !== null && tn !== null ? o.maxSpeedMps * Math.max(Math.min(ti - tp, tn - ti), 0) : o.gapMetres / 2;
    out[k] = dev > 3.5 * o.sigmaM && dev > allow ? 1 : 0;
  }
  return out;
}

/** Splits the track where consecutive fixes are more than gapSeconds (timed) or gapMetres (untimed) apart. */
function splitPieces(fixes: Fix[], p: FramePoints, o: ResolvedMatchOptions): number[][] {
  const pieces: number[][] = [];
  let cur: number[] = [];
  for (let i = 0; i < fixes.length; i++) {
    if (i > 0) {
      const t = fixes[i].t;
      const u = fixes[i - 1].t;
      const gap = t !== null && u !== null ? Math.abs(t - u) > o.gapSeconds : dist(p, i - 1, i) > o.gapMetres;
      if (gap) pieces.push(cur), (cur = []);
    }
    cur.push(i);
  }
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
 * the search radius, runs Viterbi per stretch over the fixes the 2σ thinning keeps (the others placed on
 * their neighbours' route afterwards), and reports each matched fix's route, chainage and signed lateral
 * offset. ≥ 3 consecutive fixes with no route in reach are an unmatched run (an unplanned stretch);
 * 1–2 such fixes are outliers. Fixes keep the given order, so survey points (t null) follow it too.
 * `matchTrace(fixes, routes, buildRouteGraph(routes), { sigmaM: 4 })` → `{ matched: [{ seq: 0, ref: 'N1', chainageM: 12.3, offsetM: 0.4, … }], unmatched: [], outliers: [], pieces: 1 }`
 */
export function matchTrace(fixes: Fix[], routes: PlannedRouteInput[], graph: RouteGraph, opts: MatchOptions, prepared?: MatchNetwork): MatchResult {
  return new TraceMatcher(fixes, routes, resolveMatchOptions(opts), prepared ?? prepareMatchNetwork(routes, graph)).run();
}

/** A position's route, chainage, offset and distance from the fix, in columns: a chain's placements, between's states. */
interface Placements {
  route: Int32Array;
  chainage: Float64Array;
  offset: Float64Array;
  distance: Float64Array;
}

/** between's states: placements with their positions on the graph, scores and back pointers. */
interface States extends Placements {
  edge: Int32Array;
  leg0: Float64Array;
  leg1: Float64Array;
  score: Float64Array;
  back: Int8Array;
}

// (each a literal of its own, never a spread: every object of a kind then has one shape, which V8's code for
// the steps below is specialised to)
const placements = (n: number): Placements => ({ route: new Int32Array(n), chainage: new Float64Array(n), offset: new Float64Array(n), distance: new Float64Array(n) });
const states = (n: number): States => ({
  route: new Int32Array(n), chainage: new Float64Array(n), offset: new Float64Array(n), distance: new Float64Array(n),
  edge: new Int32Array(n), leg0: new Float64Array(n), leg1: new Float64Array(n), score: new Float64Array(n), back: new Int8Array(n),
});

/**
 * One matchTrace call's state and steps. Its steps are methods, not closures made inside matchTrace: V8
 * keeps a method's optimised code from call to call, while a closure's (its on-stack replacement above all)
 * is tied to the call that made it and is compiled again, in the next call, while that call runs slower.
 */
class TraceMatcher {
  readonly plane: FramePoints;
  readonly pieces: number[][];
  readonly result: MatchResult;
  readonly logBeta: number;
  readonly outlierAt: number[] = [];
  readonly index: CandidateIndex;
  readonly net: RouteNetwork;
  /** the current chain's candidates: those of its k-th fix are first[k] … first[k + 1] − 1 in cands */
  readonly cands = new CandidateColumns();
  /** the candidates as positions: each one's graph edge and its legs to the edge's from and to node, found once */
  readonly pos: PositionColumns;
  /** the current chain's fixes (indices into fixes), chainLength of them: typed, each as long as the trace */
  readonly chain: Int32Array;
  chainLength = 0;
  readonly first: Int32Array;
  /** per layer of the current chain: whether it is kept for the recursion, and where it was placed */
  readonly kept: Uint8Array;
  placed = placements(64);
  /** projectInFrame's answer */
  readonly foot = { chainageM: 0, offsetM: 0, distanceM: 0 };
  /** between's scratch, grown as needed: positions on the two routes, two a layer, with their scores */
  st = states(64);
  /** the bound of the step between is scoring */
  readonly stepBound = new Float64Array(1);
  /** the layers solve is running Viterbi over: their first candidates, straight-line steps and bounds */
  layerAt: Int32Array = new Int32Array(0);
  layerGc: Float64Array = new Float64Array(0);
  layerBound: Float64Array = new Float64Array(0);
  /** solve's transition callback (made once: viterbiPruned calls the same function every time) */
  readonly transitionInto: (k: number, i: number, j: number, out: Float64Array) => void;
  /** the current piece's run of fixes with no route in reach, its chain's last kept fix and how far its nearest route is */
  far: number[] = [];
  lastKept = -1;
  lastNear = 0;

  constructor(
    readonly fixes: Fix[],
    readonly routes: PlannedRouteInput[],
    readonly o: ResolvedMatchOptions,
    prepared: MatchNetwork,
  ) {
    this.index = prepared.index;
    this.net = prepared.net;
    this.plane = toPlane(fixes, this.index);
    this.pieces = splitPieces(fixes, this.plane, o);
    this.result = { matched: [], unmatched: [], outliers: [], pieces: this.pieces.length };
    this.logBeta = Math.log(o.betaM);
    const c = this.cands;
    this.pos = { route: c.route, chainage: c.chainage, edge: new Int32Array(c.route.length), leg0: new Float64Array(c.route.length), leg1: new Float64Array(c.route.length) };
    this.chain = new Int32Array(fixes.length);
    this.first = new Int32Array(fixes.length + 1);
    this.kept = new Uint8Array(fixes.length);
    this.transitionInto = (k, i, j, out) => this.transition(k, i, j, out);
  }

  run(): MatchResult {
    for (const piece of this.pieces) this.matchPiece(piece);
    // a spike inside a run of far fixes is found before the run closes: restore input order
    const { result, fixes } = this;
    result.outliers = this.outlierAt.sort((a, b) => a - b).map((i) => fixes[i].seq);
    return result;
  }

  /** The transition from candidate i of layer k − 1 to candidate j of layer k of the Viterbi solve is running. */
  transition(k: number, i: number, j: number, out: Float64Array): void {
    const at = this.layerAt;
    positionDistanceInto(this.net, this.pos, at[k - 1] + i, at[k] + j, this.layerBound, k);
    const d = this.net.distance[0];
    out[0] = d === Infinity ? -Infinity : -Math.abs(d - this.layerGc[k]) / this.o.betaM - this.logBeta;
  }

  /**
   * Viterbi over layers of the current chain: layer k holds the candidates at[k] … at[k] + n[k] − 1 of fix
   * fx[k]. Returns the chosen candidate of each layer.
   */
  solve(at: Int32Array, n: Int32Array, fx: Int32Array): Int32Array {
    const m = fx.length;
    // Newson & Krumm drop transitions whose route is far longer than the straight line between the fixes
    const gc = new Float64Array(m);
    const bound = new Float64Array(m);
    for (let k = 1; k < m; k++) (gc[k] = dist(this.plane, fx[k - 1], fx[k])), (bound[k] = 4 * gc[k] + 50);
    let total = 0;
    for (let k = 0; k < m; k++) total += n[k];
    const emissions = new Float64Array(total);
    const { cands, o } = this;
    for (let k = 0, e = 0; k < m; k++) for (let j = 0; j < n[k]; j++) emissions[e++] = emissionLogProb(cands.distance[at[k] + j], o.sigmaM);
    // route distances are the costly part: asked for only where a transition can still change the best path
    (this.layerAt = at), (this.layerGc = gc), (this.layerBound = bound);
    const { path } = viterbiPruned(n, emissions, -this.logBeta, this.transitionInto);
    for (let k = 0; k < m; k++) path[k] += at[k];
    return path;
  }

  place(k: number, route: number, chainageM: number, offsetM: number, distanceM: number): void {
    const p = this.placed;
    (p.route[k] = route), (p.chainage[k] = chainageM), (p.offset[k] = offsetM), (p.distance[k] = distanceM);
  }

  /** (column to column, so that no number crosses a call) */
  placeCandidate(k: number, c: number): void {
    const p = this.placed;
    const cands = this.cands;
    (p.route[k] = cands.route[c]), (p.chainage[k] = cands.chainage[c]), (p.offset[k] = cands.offset[c]), (p.distance[k] = cands.distance[c]);
  }

  /** fix i projected onto a route, into this.foot */
  project(i: number, route: number): void {
    const plane = this.plane;
    projectInFrame(this.index, route, plane.x[i], plane.y[i], plane.kx[i], plane.ky[i], this.foot);
  }

  placeOn(k: number, route: number): void {
    this.project(this.chain[k], route);
    const foot = this.foot;
    this.place(k, route, foot.chainageM, foot.offsetM, foot.distanceM);
  }

  searched(k: number): boolean {
    return this.first[k + 1] > this.first[k];
  }

  /** state x of between's scratch from candidate c */
  fromCandidate(x: number, c: number): void {
    const { st, cands, pos } = this;
    (st.route[x] = cands.route[c]), (st.chainage[x] = cands.chainage[c]), (st.offset[x] = cands.offset[c]), (st.distance[x] = cands.distance[c]);
    (st.edge[x] = pos.edge[c]), (st.leg0[x] = pos.leg0[c]), (st.leg1[x] = pos.leg1[c]);
  }

  /**
   * The skipped fixes between kept layers ka and kb when the kept ones chose different routes (a turn at a
   * junction): Viterbi over their positions on just those two routes (their candidates there, or, for a fix
   * never searched, its projection), both ends fixed. False, with nothing placed, when a searched fix has a
   * candidate on neither or the two routes do not connect within reach.
   */
  between(ka: number, kb: number, ca: number, cb: number): boolean {
    const { cands, first, o, net, plane, chain, foot, stepBound } = this;
    const r1 = cands.route[ca];
    const r2 = cands.route[cb];
    const span = kb - ka + 1;
    // two states a layer at most (one position per route): state s of layer j is at 2j + s
    const size = 2 * span;
    if (this.st.route.length < size) this.st = states(2 * size);
    const st = this.st;
    st.route.fill(-1, 0, size);
    this.fromCandidate(0, ca);
    this.fromCandidate(2 * (span - 1), cb);
    for (let j = 1; j + 1 < span; j++) {
      const k = ka + j;
      if (this.searched(k)) {
        let x = 2 * j;
        for (let c = first[k]; c < first[k + 1]; c++) if (cands.route[c] === r1 || cands.route[c] === r2) this.fromCandidate(x++, c);
        if (x === 2 * j) return false;
      } else {
        for (let t = 0; t < (r2 === r1 ? 1 : 2); t++) {
          const r = t === 0 ? r1 : r2;
          const x = 2 * j + t;
          this.project(chain[k], r);
          (st.route[x] = r), (st.chainage[x] = foot.chainageM), (st.offset[x] = foot.offsetM), (st.distance[x] = foot.distanceM);
        }
        locatePositions(net, st, 2 * j, 2 * j + 2);
      }
    }
    const { score, back } = st;
    const logBeta = this.logBeta;
    score.fill(-Infinity, 0, size);
    score[0] = 0;
    for (let j = 1; j < span; j++) {
      const k = ka + j;
      const gc = dist(plane, chain[k - 1], chain[k]);
      stepBound[0] = 4 * gc + 50;
      let reached = false;
      for (let t = 0; t < 2; t++) {
        const y = 2 * j + t;
        if (st.route[y] < 0) continue;
        const e = j === span - 1 ? 0 : emissionLogProb(st.distance[y], o.sigmaM);
        // the likelier predecessor first: no transition beats −log β, so the other may need no route distance
        const likelier = score[2 * (j - 1) + 1] > score[2 * (j - 1)] ? 1 : 0;
        for (let r = 0; r < 2; r++) {
          const q = r === 0 ? likelier : 1 - likelier;
          const x = 2 * (j - 1) + q;
          if (st.route[x] < 0 || score[x] === -Infinity || score[x] - logBeta + e < score[y]) continue;
          positionDistanceInto(net, st, x, y, stepBound, 0);
          const d = net.distance[0];
          if (d === Infinity) continue;
          const v = score[x] - Math.abs(d - gc) / o.betaM - logBeta + e;
          // ties go to state 0, as in index order
          if (v > score[y] || (v === score[y] && q < back[y])) (score[y] = v), (back[y] = q);
        }
        if (score[y] > -Infinity) reached = true;
      }
      if (!reached) return false;
    }
    for (let j = span - 1, t = 0; j > 0; t = back[2 * j + t], j--) {
      const x = 2 * j + t;
      if (j < span - 1) this.place(ka + j, st.route[x], st.chainage[x], st.offset[x], st.distance[x]);
    }
    return true;
  }

  /** Candidates for layer k of the chain found now (a skipped fix the recursion needs after all), at the end of cands; returns how many. */
  searchLate(k: number): number {
    const { cands, o } = this;
    const at = cands.length;
    const n = prune(cands, at, appendCandidatesAt(this.index, this.plane, this.chain[k], o.searchRadiusM, o.maxCandidates, cands), o.sigmaM);
    cands.length = at + n;
    this.located(at, n);
    return n;
  }

  runChain(): void {
    const L = this.chainLength;
    if (L === 0) return;
    const { cands, first, kept, chain, pos, fixes, routes } = this;
    const tailEnd = cands.length;
    if (this.placed.route.length < L) this.placed = placements(2 * L);
    // Newson & Krumm (2009, §4.1) leave out the fixes within 2σ of the last one kept: until the walker has
    // moved further than the noise, a fix adds little to where the route goes. They skip the recursion and
    // are placed afterwards, on the route the kept fixes either side of them chose.
    const keep: number[] = [];
    for (let k = 0; k < L; k++) if (kept[k]) keep.push(k);
    // typed layers, as the fallback below passes them: one kind of array keeps the recursion's code monomorphic
    const ka0 = new Int32Array(keep.length);
    const kn0 = new Int32Array(keep.length);
    const kf0 = new Int32Array(keep.length);
    for (let g = 0; g < keep.length; g++) (ka0[g] = first[keep[g]]), (kn0[g] = first[keep[g] + 1] - first[keep[g]]), (kf0[g] = chain[keep[g]]);
    const chosen = this.solve(ka0, kn0, kf0);
    for (let g = 0; g < keep.length; g++) this.placeCandidate(keep[g], chosen[g]);
    for (let g = 0; g < keep.length; g++) {
      const ka = keep[g];
      // after the last kept fix, the skipped ones have one neighbour: its route
      const kb = g + 1 < keep.length ? keep[g + 1] : L;
      if (kb - ka < 2) continue;
      const ca = chosen[g];
      const cb = g + 1 < keep.length ? chosen[g + 1] : chosen[g];
      // both neighbours on one route: the skipped fixes go on it (their candidate there, or their projection)
      const r = cands.route[ca];
      let same = cands.route[cb] === r;
      for (let k = ka + 1; same && k < kb; k++) {
        if (!this.searched(k)) {
          this.placeOn(k, r);
          continue;
        }
        let c = first[k];
        while (c < first[k + 1] && cands.route[c] !== r) c++;
        if (c < first[k + 1]) this.placeCandidate(k, c);
        else same = kb === L ? (this.placeOn(k, r), true) : false;
      }
      if (same || this.between(ka, kb, ca, cb)) continue;
      // otherwise: Viterbi over every candidate of the skipped fixes, both ends fixed
      const span = kb - ka + 1;
      const at = new Int32Array(span);
      const n = new Int32Array(span);
      const fx = new Int32Array(span);
      for (let j = 0; j < span; j++) {
        const k = ka + j;
        fx[j] = chain[k];
        if (j === 0) (at[j] = ca), (n[j] = 1);
        else if (j === span - 1) (at[j] = cb), (n[j] = 1);
        else if (this.searched(k)) (at[j] = first[k]), (n[j] = first[k + 1] - first[k]);
        else (at[j] = cands.length), (n[j] = this.searchLate(k));
      }
      const inner = this.solve(at, n, fx);
      for (let j = 1; j + 1 < span; j++) this.placeCandidate(ka + j, inner[j]);
    }
    const placed = this.placed;
    const matched = this.result.matched;
    for (let k = 0; k < L; k++) {
      const f = fixes[chain[k]];
      matched.push({ seq: f.seq, ref: routes[placed.route[k]].ref, chainageM: placed.chainage[k], offsetM: placed.offset[k], distanceM: placed.distance[k], t: f.t });
    }
    // the fix that closed the chain may have its candidates in already: they start the next chain
    const end = first[L];
    const tail = tailEnd - end;
    for (const col of [cands.route, cands.chainage, cands.distance, cands.offset, pos.edge, pos.leg0, pos.leg1]) col.copyWithin(0, end, end + tail);
    (this.chainLength = 0), (first[0] = 0), (cands.length = tail);
  }

  /** Edges and legs for the n candidates from `at` on, the position columns grown to the candidates'. */
  located(at: number, n: number): void {
    const { pos, cands } = this;
    if (pos.edge.length < cands.route.length) {
      const size = cands.route.length;
      pos.edge = grow(pos.edge, new Int32Array(size));
      pos.leg0 = grow(pos.leg0, new Float64Array(size));
      pos.leg1 = grow(pos.leg1, new Float64Array(size));
    }
    pos.route = cands.route;
    pos.chainage = cands.chainage;
    locatePositions(this.net, pos, at, at + n);
  }

  /** Ends the current run of fixes with no route in reach: ≥ 3 of them are an unmatched run, fewer are outliers. */
  closeFar(): void {
    const far = this.far;
    if (far.length >= 3) {
      this.runChain();
      this.lastKept = -1;
      const fixes = this.fixes;
      this.result.unmatched.push(far.map((i) => fixes[i]));
    } else for (const i of far) this.outlierAt.push(i);
    this.far = [];
  }

  matchPiece(piece: number[]): void {
    const { fixes, plane, o, cands, chain, kept, first } = this;
    const spike = spikes(fixes, piece, plane, o);
    this.far = [];
    this.lastKept = -1;
    this.lastNear = 0;
    for (let k = 0; k < piece.length; k++) {
      const i = piece[k];
      if (spike[k]) {
        this.outlierAt.push(i);
        continue;
      }
      const d = this.lastKept >= 0 && this.chainLength > 0 ? dist(plane, this.lastKept, i) : Infinity;
      const keepIt = !(d < o.thinM);
      // a skipped fix this close to a kept one has a route within the search radius (triangle inequality):
      // it is surely matched, and its candidates are only looked for if the recursion needs them
      if (!keepIt && this.far.length === 0 && this.lastNear + d <= o.searchRadiusM) {
        (chain[this.chainLength] = i), (kept[this.chainLength] = 0), (first[++this.chainLength] = cands.length);
        continue;
      }
      const at = cands.length;
      const n = prune(cands, at, appendCandidatesAt(this.index, plane, i, o.searchRadiusM, o.maxCandidates, cands), o.sigmaM);
      cands.length = at + n;
      if (n === 0) {
        this.far.push(i);
        continue;
      }
      if (this.far.length > 0) this.closeFar();
      this.located(at, n);
      const keepNow = keepIt || this.chainLength === 0;
      if (keepNow) (this.lastKept = i), (this.lastNear = cands.distance[at]);
      (chain[this.chainLength] = i), (kept[this.chainLength] = keepNow ? 1 : 0), (first[++this.chainLength] = cands.length);
    }
    this.closeFar();
    this.runChain();
  }
}
