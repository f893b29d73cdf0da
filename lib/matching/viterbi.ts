/** The most likely state sequence of a layered hidden Markov model, in log space (Viterbi 1967). */

export interface ViterbiResult {
  /** the chosen state (candidate index) in each layer */
  path: Int32Array;
  /** layers where a chain starts: 0, and every layer no state of the previous one could reach */
  chainStarts: number[];
  /** sum over chains of the best chain's log probability */
  logProb: number;
}

/**
 * The best path through `counts.length` layers of `counts[k]` states each, the emissions of all states in one
 * flat array, layer by layer; as Newson & Krumm (2009) restart the HMM after a break, a layer nothing reaches
 * starts a new chain (the chain before it ends at its own best state). Each transition is asked for only when it can matter: no transition
 * is more likely than `maxTransition` (for Newson & Krumm's exponential, −log β), so once a state's best
 * predecessor so far beats what any less likely predecessor could reach even with that transition, the rest
 * are not asked. Predecessors are tried most likely first; ties go to the lowest predecessor index, as in
 * index order, so the path is that of the full recursion (maxTransition = Infinity asks for every one).
 * `transition(k, i, j, out)` sets out[0] to the log probability from state i of layer k − 1 to state j of
 * layer k, ≤ maxTransition (written, not returned: a number returned from a call is boxed, one allocation a
 * transition). A layer nothing reaches starts a new chain.
 * `viterbiPruned([2, 2], Float64Array.of(0, -5, -5, 0), 0, (k, i, j, out) => (out[0] = 0)).path` → `Int32Array [0, 1]`
 */
export function viterbiPruned(
  counts: ArrayLike<number>,
  emissions: Float64Array,
  maxTransition: number,
  transition: (layer: number, from: number, to: number, out: Float64Array) => void,
): ViterbiResult {
  const n = counts.length;
  const offset = new Int32Array(n + 1);
  let widest = 0;
  for (let k = 0; k < n; k++) {
    if (!(counts[k] >= 1)) throw new RangeError(`viterbi: layer ${k} has no states`);
    offset[k + 1] = offset[k] + counts[k];
    widest = Math.max(widest, counts[k]);
  }
  // back[offset[k] + j]: best predecessor of state j in layer k; −1 where layer k starts a chain
  const back = new Int32Array(offset[n]);
  let prev = new Float64Array(widest);
  let cur = new Float64Array(widest);
  // the previous layer's reachable states, most likely first
  const order = new Int32Array(widest);
  const chainStarts: number[] = [];
  /** the best final state of the chain ending just before each chain start */
  const chainEnds: number[] = [];
  let logProb = 0;
  const asked = new Float64Array(1);
  const argmax = (a: Float64Array, m: number) => {
    let b = 0;
    for (let j = 1; j < m; j++) if (a[j] > a[b]) b = j;
    return b;
  };
  for (let k = 0; k < n; k++) {
    const m = counts[k];
    const base = offset[k];
    let reachable = false;
    if (k > 0) {
      const pm = counts[k - 1];
      let live = 0;
      for (let i = 0; i < pm; i++) {
        if (prev[i] === -Infinity) continue;
        let at = live++;
        for (; at > 0 && prev[order[at - 1]] < prev[i]; at--) order[at] = order[at - 1];
        order[at] = i;
      }
      for (let j = 0; j < m; j++) {
        const e = emissions[base + j];
        let best = -Infinity;
        let from = -1;
        if (e !== -Infinity) {
          for (let r = 0; r < live; r++) {
            const i = order[r];
            // no transition can lift this predecessor (or any after it) above the best so far
            if (prev[i] + maxTransition < best) break;
            transition(k, i, j, asked);
            const s = prev[i] + asked[0];
            if (s > best || (s === best && s > -Infinity && i < from)) (best = s), (from = i);
          }
        }
        cur[j] = best + e;
        back[base + j] = from;
        if (from >= 0 && cur[j] !== -Infinity) reachable = true;
      }
    }
    if (!reachable) {
      if (k > 0) {
        const end = argmax(prev, counts[k - 1]);
        chainEnds.push(end);
        if (prev[end] !== -Infinity) logProb += prev[end];
      }
      chainStarts.push(k);
      for (let j = 0; j < m; j++) (cur[j] = emissions[base + j]), (back[base + j] = -1);
    }
    const swap = prev;
    prev = cur;
    cur = swap;
  }
  const path = new Int32Array(n);
  if (n === 0) return { path, chainStarts, logProb: 0 };
  let state = argmax(prev, counts[n - 1]);
  if (prev[state] !== -Infinity) logProb += prev[state];
  let chain = chainStarts.length - 1;
  for (let k = n - 1; k >= 0; k--) {
    path[k] = state;
    if (k === chainStarts[chain]) {
      // crossing into the previous chain: continue from its own best end
      if (chain > 0) state = chainEnds[chain - 1];
      chain--;
    } else state = back[offset[k] + state];
  }
  return { path, chainStarts, logProb };
}
