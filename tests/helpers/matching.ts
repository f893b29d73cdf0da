import { appendCandidatesAt, CandidateColumns, toFrameInto, type CandidateIndex, type FramePoints } from '@/lib/matching/candidates';
import { locatePositions, positionDistanceInto, type PositionColumns, type RouteNetwork } from '@/lib/matching/route-distance';
import { viterbiPruned, type ViterbiResult } from '@/lib/matching/viterbi';

// Plain, one-at-a-time forms of the matcher's column-wise steps, for tests to state cases in and to compare
// against: the matcher itself runs on columns (appendCandidatesAt, positionDistanceInto, viterbiPruned).

/** A possible position of one fix on one route (the best projection onto that route). */
export interface Candidate {
  /** index into the routes the candidate index was built from */
  route: number;
  ref: string;
  chainageM: number;
  distanceM: number;
  /** + left of the route direction */
  offsetM: number;
}

const onePoint = (): FramePoints => ({ x: new Float64Array(1), y: new Float64Array(1), kx: new Float64Array(1), ky: new Float64Array(1) });

/**
 * The candidate search's answer for one fix as objects: up to `max` candidates within `radiusM`, the best
 * projection per route, nearest first (appendCandidatesAt on the fix put into the index's frame).
 * `candidatesFor(index, { lon: 13.405, lat: 52.52 }, 16, 5)` → `[{ ref: 'N1', distanceM: 2.9, offsetM: -2.9, … }, …]`
 */
export function candidatesFor(index: CandidateIndex, fix: { lon: number; lat: number }, radiusM: number, max: number): Candidate[] {
  const p = onePoint();
  toFrameInto(index, fix.lon, fix.lat, p, 0);
  const cols = new CandidateColumns();
  const n = appendCandidatesAt(index, p, 0, radiusM, max, cols);
  const out: Candidate[] = [];
  for (let c = 0; c < n; c++) {
    const k = cols.route[c];
    out.push({ route: k, ref: index.routes[k].ref, chainageM: cols.chainage[c], distanceM: cols.distance[c], offsetM: cols.offset[c] });
  }
  return out;
}

/** A position on the plan: route (its index) and chainage. */
export interface RoutePosition {
  route: number;
  chainageM: number;
}

/**
 * Network distance between positions x and y of `p` (their edges and legs found by locatePositions), Infinity
 * beyond `boundM`: positionDistanceInto with its bound in the network's spare answer slot.
 * `positionDistance(net, cols, 0, 1, 100)` → 15 for positions 10 m and 25 m along one route
 */
export function positionDistance(net: RouteNetwork, p: PositionColumns, x: number, y: number, boundM: number): number {
  // the bound goes in the answer's column, one slot on: it is read before the answer is written
  net.distance[1] = boundM;
  positionDistanceInto(net, p, x, y, net.distance, 1);
  return net.distance[0];
}

/**
 * positionDistance from each of the positions a … a + na − 1 to each of b … b + nb − 1, row-major into `out`.
 * `routeDistanceMatrix(net, cols, 0, 2, 2, 3, 70, out)` → out[0 … 5] = distances from positions 0, 1 to 2, 3, 4
 */
export function routeDistanceMatrix(net: RouteNetwork, p: PositionColumns, a: number, na: number, b: number, nb: number, boundM: number, out: Float64Array): void {
  for (let i = 0; i < na; i++) for (let j = 0; j < nb; j++) out[i * nb + j] = positionDistance(net, p, a + i, b + j, boundM);
}

/**
 * Network distance between two positions on the plan: |Δchainage| on one route; across routes the shortest
 * path over the graph from a's edge ends to b's edge ends; Infinity beyond `boundM`.
 * `routeDistanceM(net, { route: 0, chainageM: 10 }, { route: 0, chainageM: 25 }, 100)` → 15
 */
export function routeDistanceM(net: RouteNetwork, a: RoutePosition, b: RoutePosition, boundM: number): number {
  const p: PositionColumns = { route: Int32Array.of(a.route, b.route), chainage: Float64Array.of(a.chainageM, b.chainageM), edge: new Int32Array(2), leg0: new Float64Array(2), leg1: new Float64Array(2) };
  locatePositions(net, p, 0, 2);
  return positionDistance(net, p, 0, 1, boundM);
}

/**
 * viterbiPruned asked for every transition (no bound), with the emissions of all states in one flat array
 * (layer by layer) and the transitions into each layer filled in at once: `transitions(k, out)` sets
 * out[i · counts[k] + j] for every state i of layer k − 1 and j of layer k.
 * `viterbiLayers([2, 2], Float64Array.of(0, -5, -5, 0), (k, out) => out.fill(0)).path` → `Int32Array [0, 1]`
 */
export function viterbiLayers(counts: ArrayLike<number>, emissions: Float64Array, transitions: (layer: number, out: Float64Array) => void): ViterbiResult {
  let trans = new Float64Array(0);
  let filled = -1;
  return viterbiPruned(counts, emissions, Infinity, (k, i, j, out) => {
    if (filled !== k) {
      const size = counts[k - 1] * counts[k];
      if (trans.length < size) trans = new Float64Array(size);
      transitions(k, trans);
      filled = k;
    }
    out[0] = trans[i * counts[k] + j];
  });
}

/**
 * viterbiLayers with an emission and a transition function per state and pair of states.
 * `viterbi([2, 2], (k, j) => (j === k ? 0 : -5), () => 0).path` → `Int32Array [0, 1]`
 */
export function viterbi(
  counts: ArrayLike<number>,
  emission: (layer: number, state: number) => number,
  transition: (layer: number, from: number, to: number) => number,
): ViterbiResult {
  let total = 0;
  for (let k = 0; k < counts.length; k++) total += counts[k] >= 1 ? counts[k] : 0;
  const emissions = new Float64Array(total);
  for (let k = 0, c = 0; k < counts.length; k++) for (let j = 0; j < counts[k]; j++) emissions[c++] = emission(k, j);
  return viterbiLayers(counts, emissions, (k, out) => {
    const pm = counts[k - 1];
    const m = counts[k];
    for (let i = 0; i < pm; i++) for (let j = 0; j < m; j++) out[i * m + j] = transition(k, i, j);
  });
}
