import { describe, expect, it } from 'vitest';
import { appendCandidatesAt, CandidateColumns, makeCandidateIndex, toFrameInto } from '@/lib/matching/candidates';
import { lonDelta } from '@/lib/matching/chainage';
import { buildRouteGraph } from '@/lib/matching/route-graph';
import { locatePositions, makeRouteNetwork, type PositionColumns } from '@/lib/matching/route-distance';
import { viterbiPruned } from '@/lib/matching/viterbi';
import { SortedWindow, WindowExtremes } from '@/lib/matching/sliding-window';
import { Scratch } from '@/lib/matching/scratch';
import { seqLookup } from '@/lib/matching/reconcile-project';
import { stableOrder } from '@/lib/matching/build-sections';
import { candidatesFor, routeDistanceM, routeDistanceMatrix, viterbi, viterbiLayers } from '../../helpers/matching';
import { gridScenario, mulberry32, streetScenario } from './scenario';

// The matcher keeps a long trace's candidates in typed columns, finds a layer's route distances at once behind
// an edge-pair cache, and runs Viterbi on flat arrays. Each fast path is checked here against the plain one it
// replaces, value for value: the bench figures in the README rest on these giving the same matches.

describe('compact candidates', () => {
  it('a trace\'s candidates appended to one set of columns are each fix\'s own, past the columns growing', () => {
    const gs = gridScenario(4, { blocks: 4, fixes: 3000 });
    const index = makeCandidateIndex(gs.routes);
    const n = gs.handheld.length;
    const plane = { x: new Float64Array(n), y: new Float64Array(n), kx: new Float64Array(n), ky: new Float64Array(n) };
    gs.handheld.forEach(({ fix }, i) => toFrameInto(index, fix.lon, fix.lat, plane, i));
    const cols = new CandidateColumns();
    let checked = 0;
    gs.handheld.forEach(({ fix }, i) => {
      const at = cols.length;
      const got = appendCandidatesAt(index, plane, i, 16.5, 5, cols);
      // the same fix searched alone, into columns of its own
      const alone = candidatesFor(index, fix, 16.5, 5);
      expect(got).toBe(alone.length);
      alone.forEach((c, j) => {
        expect([cols.route[at + j], cols.chainage[at + j], cols.distance[at + j], cols.offset[at + j]]).toEqual([c.route, c.chainageM, c.distanceM, c.offsetM]);
        checked++;
      });
    });
    expect(cols.length).toBe(checked);
    expect(checked).toBeGreaterThan(1024 * 4); // the columns started at 1,024 and grew
  });

  it('lonDelta is the remainder formula, number for number, near the origin and across the antimeridian', () => {
    // the formula written out here, as the frames used it before the shortcut
    const byRemainders = (d: number) => ((((d % 360) + 540) % 360) - 180);
    const u = mulberry32(9);
    const samples = [0, -0, 1e-12, -1e-12, 0.25, -0.25, 89.999999, -89.999999, 90, -90, 179.5, -179.5, 180, -180, 359, -359, 721.5];
    for (let i = 0; i < 20000; i++) samples.push((u() - 0.5) * 180, (u() - 0.5) * 1e-3, (u() - 0.5) * 1000);
    for (const d of samples) expect(Object.is(lonDelta(d), byRemainders(d)), `d = ${d}`).toBe(true);
  });
});

describe('route distances a layer at a time', () => {
  it('routeDistanceMatrix over a walk equals routeDistanceM on a fresh network, pair for pair', () => {
    const gs = gridScenario(5, { blocks: 4, fixes: 400 });
    const graph = buildRouteGraph(gs.routes);
    const index = makeCandidateIndex(gs.routes);
    const cols = new CandidateColumns();
    const first = [0];
    const plane = { x: new Float64Array(1), y: new Float64Array(1), kx: new Float64Array(1), ky: new Float64Array(1) };
    for (const { fix } of gs.handheld) {
      toFrameInto(index, fix.lon, fix.lat, plane, 0);
      if (appendCandidatesAt(index, plane, 0, 16.5, 5, cols) > 0) first.push(cols.length);
    }
    const net = makeRouteNetwork(graph, gs.routes);
    const n = cols.length;
    const pos: PositionColumns = { route: cols.route, chainage: cols.chainage, edge: new Int32Array(n), leg0: new Float64Array(n), leg1: new Float64Array(n) };
    locatePositions(net, pos, 0, n);
    const rng = mulberry32(2);
    const out = new Float64Array(25);
    let finite = 0;
    for (let k = 1; k + 1 < first.length; k++) {
      const [a, na, b, nb] = [first[k - 1], first[k] - first[k - 1], first[k], first[k + 1] - first[k]];
      // bounds vary as the matcher's do (4 × the step between fixes + 50 m), down to ones that cut paths off
      const bound = k % 7 === 0 ? 5 + 20 * rng() : 50 + 40 * rng();
      routeDistanceMatrix(net, pos, a, na, b, nb, bound, out);
      // a network with nothing cached yet: the caches must not change a distance
      const fresh = makeRouteNetwork(graph, gs.routes);
      for (let i = 0; i < na; i++) {
        for (let j = 0; j < nb; j++) {
          const want = routeDistanceM(fresh, { route: cols.route[a + i], chainageM: cols.chainage[a + i] }, { route: cols.route[b + j], chainageM: cols.chainage[b + j] }, bound);
          expect(out[i * nb + j]).toBe(want);
          if (want !== Infinity) finite++;
        }
      }
    }
    expect(finite).toBeGreaterThan(1000);
  });

  it('routeDistanceM equals a plain Dijkstra with both positions spliced into their edges, dead ends and all', () => {
    // the reference: the graph as listed (no dead-end shortcut, no caches), each position a node of its own
    // joined to its edge's two ends by its legs, textbook Dijkstra on a queue kept sorted by distance
    const gs = gridScenario(6, { blocks: 4, fixes: 10 });
    const graph = buildRouteGraph(gs.routes);
    const net = makeRouteNetwork(graph, gs.routes);
    const refIndex = new Map(gs.routes.map((r, i) => [r.ref, i]));
    const degree = new Map<number, number>();
    for (const e of graph.edges) for (const v of [e.fromNode, e.toNode]) degree.set(v, (degree.get(v) ?? 0) + 1);
    const base = new Map<number, [number, number][]>();
    const link = (adj: Map<number, [number, number][]>, u: number, v: number, w: number) => {
      adj.set(u, [...(adj.get(u) ?? []), [v, w]]);
      adj.set(v, [...(adj.get(v) ?? []), [u, w]]);
    };
    for (const e of graph.edges) link(base, e.fromNode, e.toNode, e.lengthM);
    const plain = (ea: number, ca: number, eb: number, cb: number): number => {
      const extra = new Map<number, [number, number][]>();
      const [A, B] = [-1, -2];
      for (const [node, e, c] of [[A, graph.edges[ea], ca], [B, graph.edges[eb], cb]] as const) {
        link(extra, node, e.fromNode, c - e.fromChainageM);
        link(extra, node, e.toNode, e.toChainageM - c);
      }
      // the queue: [distance, node] kept sorted by distance (binary insertion)
      const queue: [number, number][] = [[0, A]];
      const done = new Set<number>();
      while (queue.length > 0) {
        const [d, u] = queue.shift()!;
        if (done.has(u)) continue;
        if (u === B) return d;
        done.add(u);
        for (const [v, w] of [...(base.get(u) ?? []), ...(extra.get(u) ?? [])]) {
          if (done.has(v)) continue;
          let lo = 0;
          for (let hi = queue.length; lo < hi; ) {
            const mid = (lo + hi) >> 1;
            if (queue[mid][0] <= d + w) lo = mid + 1;
            else hi = mid;
          }
          queue.splice(lo, 0, [d + w, v]);
        }
      }
      return Infinity;
    };
    const rng = mulberry32(9);
    let deadEnds = 0;
    let compared = 0;
    for (let t = 0; t < 300; t++) {
      const [ea, eb] = [Math.floor(rng() * graph.edges.length), Math.floor(rng() * graph.edges.length)];
      const [a, b] = [graph.edges[ea], graph.edges[eb]];
      if (a.ref === b.ref) continue;
      const ca = a.fromChainageM + rng() * (a.toChainageM - a.fromChainageM);
      const cb = b.fromChainageM + rng() * (b.toChainageM - b.fromChainageM);
      const got = routeDistanceM(net, { route: refIndex.get(a.ref)!, chainageM: ca }, { route: refIndex.get(b.ref)!, chainageM: cb }, 1e6);
      expect(got).toBeCloseTo(plain(ea, ca, eb, cb), 9);
      if ([a.fromNode, a.toNode, b.fromNode, b.toNode].some((v) => degree.get(v) === 1)) deadEnds++;
      compared++;
    }
    expect(compared).toBeGreaterThan(250);
    // most pairs have a crossing's far end among their edges' nodes: the shortcut past dead ends is exercised
    expect(deadEnds).toBeGreaterThan(100);
  });

  it('routeDistanceM across a junction is the legs to it plus nothing: both sides of one street corner', () => {
    const sc = streetScenario(3);
    const net = makeRouteNetwork(buildRouteGraph(sc.routes), sc.routes);
    const [n1, x1] = [sc.routes.findIndex((r) => r.ref === 'N1'), sc.routes.findIndex((r) => r.ref === 'X1')];
    // X1 starts on N1 at 100 m (a T-junction): 95 m along N1 to 2 m along X1 is 5 + 2 m
    expect(routeDistanceM(net, { route: n1, chainageM: 95 }, { route: x1, chainageM: 2 }, 50)).toBeCloseTo(7, 1);
    expect(routeDistanceM(net, { route: n1, chainageM: 95 }, { route: x1, chainageM: 2 }, 6)).toBe(Infinity);
  });
});

describe('viterbiLayers', () => {
  it('finds the best of every path, as enumerating them all does (Viterbi 1967)', () => {
    const rng = mulberry32(9);
    for (let trial = 0; trial < 40; trial++) {
      const counts = Array.from({ length: 6 }, () => 1 + Math.floor(rng() * 3));
      const em = counts.map((m) => Array.from({ length: m }, () => -5 * rng()));
      const tr = counts.map((m, k) => Array.from({ length: k > 0 ? counts[k - 1] * m : 0 }, () => (rng() < 0.15 ? -Infinity : -3 * rng())));
      // every path, scored: emissions plus transitions
      let best = { score: -Infinity, path: [] as number[] };
      const walk = (k: number, path: number[], score: number) => {
        if (k === counts.length) return void (score > best.score && (best = { score, path: [...path] }));
        for (let j = 0; j < counts[k]; j++) walk(k + 1, [...path, j], score + em[k][j] + (k > 0 ? tr[k][path[k - 1] * counts[k] + j] : 0));
      };
      walk(0, [], 0);
      if (best.score === -Infinity) continue; // a break: the chain-restart rule applies (match-trace.test.ts)
      const fast = viterbiLayers(counts, Float64Array.from(em.flat()), (k, out) => out.set(tr[k]));
      expect([...fast.path]).toEqual(best.path);
      expect(fast.logProb).toBeCloseTo(best.score, 12);
      const plain = viterbi(counts, (k, j) => em[k][j], (k, i, j) => tr[k][i * counts[k] + j]);
      expect([...plain.path]).toEqual(best.path);
      // transitions are all ≤ 0 here: the pruned recursion may skip those that cannot win, never the winner
      const pruned = viterbiPruned(counts, Float64Array.from(em.flat()), 0, (k, i, j, out) => (out[0] = tr[k][i * counts[k] + j]));
      expect([...pruned.path]).toEqual(best.path);
    }
  });

  it('gives viterbiLayers\' own result when pruned, chain breaks and ties included, and asks for fewer transitions', () => {
    const rng = mulberry32(21);
    let asked = 0;
    let all = 0;
    for (let trial = 0; trial < 200; trial++) {
      const counts = Array.from({ length: 12 }, () => 1 + Math.floor(rng() * 5));
      // emissions far apart, as a near and a far candidate are; ties from rounding to whole numbers
      const em = counts.map((m) => Array.from({ length: m }, () => -Math.round(12 * rng())));
      const tr = counts.map((m, k) => Array.from({ length: k > 0 ? counts[k - 1] * m : 0 }, () => (rng() < 0.1 ? -Infinity : -Math.log(3) - Math.round(4 * rng()))));
      const full = viterbiLayers(counts, Float64Array.from(em.flat()), (k, out) => out.set(tr[k]));
      const pruned = viterbiPruned(counts, Float64Array.from(em.flat()), -Math.log(3), (k, i, j, out) => (asked++, (out[0] = tr[k][i * counts[k] + j])));
      all += tr.reduce((n, t) => n + t.length, 0);
      expect([...pruned.path]).toEqual([...full.path]);
      expect(pruned.chainStarts).toEqual(full.chainStarts);
      expect(pruned.logProb).toBe(full.logProb);
    }
    expect(asked).toBeLessThan(all);
  });
});

describe('Scratch', () => {
  it('hands out views that do not overlap, stay valid when its buffer grows, and are handed out again after reset', () => {
    const s = new Scratch();
    const a = s.f64(3000);
    const b = s.f64(3000); // past the first buffer's 4,096: a new buffer
    const c = s.i32(10);
    a.fill(1), b.fill(2), c.fill(3);
    expect([a.length, b.length, c.length]).toEqual([3000, 3000, 10]);
    expect(a.every((x) => x === 1) && b.every((x) => x === 2)).toBe(true);
    expect(a.buffer).not.toBe(b.buffer);
    s.reset();
    const d = s.f64(5);
    // the space is handed out again: d is the start of the newest buffer, b's
    expect(d.buffer).toBe(b.buffer);
    expect([...d]).toEqual([2, 2, 2, 2, 2]);
  });
});

describe('sliding windows', () => {
  it('keeps the window sorted as its bounds slide: the same values as sorting each window afresh', () => {
    const rng = mulberry32(5);
    // quarter metres, so that many values tie (+ 0 turns −0 into 0: the two are equal, and either may come first)
    const values = Float64Array.from({ length: 400 }, () => Math.round(20 * (rng() - 0.5)) / 4 + 0);
    const w = new SortedWindow(values);
    // two more windows on one scratch, the second's columns right after the first's: neither may spill over
    const scratch = new Scratch();
    const [u, v] = [new SortedWindow(values, scratch), new SortedWindow(values, scratch)];
    let b = [0, 0, 0, 0];
    for (let step = 0; step < 300; step++) {
      // four bounds, each moving forward by 0–3, kept in order
      const next = b.map((x) => x + Math.floor(4 * rng()));
      for (let k = 1; k < 4; k++) next[k] = Math.max(next[k], next[k - 1]);
      b = next.map((x) => Math.min(x, values.length));
      w.moveTo(b[0], b[1], b[2], b[3]);
      u.moveTo(b[0], b[1], b[2], b[3]);
      v.moveTo(0, b[0], b[3], b[3]);
      // truth: Array.prototype.sort of the window's values
      const truth = [...values.subarray(b[0], b[1]), ...values.subarray(b[2], b[3])].sort((x, y) => x - y);
      expect([...w.sorted.subarray(0, w.size)]).toEqual(truth);
      expect([...u.sorted.subarray(0, u.size)]).toEqual(truth);
      expect([...v.sorted.subarray(0, v.size)]).toEqual([...values.subarray(0, b[0])].sort((x, y) => x - y));
    }
    expect(() => w.moveTo(0, 0, 0, 0)).toThrow(/moved back/);
  });

  it('tracks the smallest and largest number in a sliding window, NaN left out', () => {
    const rng = mulberry32(6);
    const values = Float64Array.from({ length: 300 }, () => (rng() < 0.2 ? NaN : Math.round(100 * rng())));
    const x = new WindowExtremes(values);
    let [lo, hi] = [0, 0];
    for (let step = 0; step < 250; step++) {
      hi = Math.min(values.length, hi + Math.floor(4 * rng()));
      lo = Math.min(hi, lo + Math.floor(4 * rng()));
      x.moveTo(lo, hi);
      const nums = [...values.subarray(lo, hi)].filter((v) => !Number.isNaN(v));
      expect(x.count).toBe(nums.length);
      expect(x.min()).toBe(nums.length ? Math.min(...nums) : Infinity);
      expect(x.max()).toBe(nums.length ? Math.max(...nums) : -Infinity);
    }
  });
});

describe('stableOrder', () => {
  it('orders indices as the engine\'s stable sort by key does (ECMAScript 2019 requires Array.prototype.sort to be stable), ties and -0 included', () => {
    const rnd = mulberry32(7);
    for (const n of [0, 1, 2, 3, 17, 64, 1000, 4097]) {
      // few distinct keys, so that most comparisons are ties; a walk back and forth gives runs both ways
      const keys = Float64Array.from({ length: n }, (_, i) => (i % 5 === 0 ? -0 : Math.round(rnd() * 40) / 4 - (i % 3)));
      const expected = Array.from({ length: n }, (_, i) => i).sort((a, b) => keys[a] - keys[b]);
      expect([...stableOrder(keys)]).toEqual(expected);
    }
  });
});

describe('seqLookup', () => {
  it('finds fixes by seq, compact or sparse, and names a seq it does not hold', () => {
    const compact = [5, 6, 7, 9].map((seq) => ({ lon: seq, lat: 0, t: null, seq }));
    const sparse = [3, 1e9, -4.5].map((seq) => ({ lon: seq, lat: 0, t: null, seq }));
    for (const trace of [compact, sparse]) {
      const at = seqLookup(trace);
      for (const f of trace) expect(at(f.seq)).toBe(f);
      expect(() => at(8)).toThrow('no fix with seq 8 in this trace');
    }
  });
});
