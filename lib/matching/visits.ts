import { lineLengthM, localFrame } from './chainage';
import { localLinearFrom } from './unplanned-line';
import type { Fix, MatchedFix } from './match-types';
import type { LonLat, PlannedRouteInput, RouteGraph } from './types';

/** A visit: consecutive matched fixes of one trace on one route, `start` to `end` (exclusive) in match order. */
export interface Visit {
  ref: string;
  start: number;
  end: number;
}

/**
 * Cuts a trace's matched fixes into visits, one per stay on a route.
 * `splitVisits([{ ref: 'A' }, { ref: 'A' }, { ref: 'B' }])` → `[{ ref: 'A', start: 0, end: 2 }, { ref: 'B', start: 2, end: 3 }]`
 */
export function splitVisits(matched: { ref: string }[]): Visit[] {
  const out: Visit[] = [];
  for (let i = 0; i < matched.length; i++) {
    const last = out[out.length - 1];
    if (last && last.ref === matched[i].ref) last.end = i + 1;
    else out.push({ ref: matched[i].ref, start: i, end: i + 1 });
  }
  return out;
}

/**
 * Near a junction a noisy walk along route A hops onto B and back, because within its noise the fixes fit
 * either. A short visit to B between two visits of A whose fixes all lie within `radiusM` of A, or no
 * farther from A than from B, is such a hop: its fixes are put back on A (`project(fix, 'A')`: chainage,
 * signed offset and distance on A, or null when A is unknown), so B does not gain a false stretch of trench.
 * A real walk along B leaves A's reach, or arrives from a third route.
 */
export function foldJunctionHops(
  matched: MatchedFix[],
  project: (m: MatchedFix, ref: string) => { chainageM: number; offsetM: number; distanceM: number } | null,
  opts: { radiusM: number; maxFixes: number },
): { fixes: MatchedFix[]; folded: number } {
  const visits = splitVisits(matched);
  let out: MatchedFix[] | null = null;
  let folded = 0;
  for (let v = 1; v + 1 < visits.length; v++) {
    const prev = visits[v - 1];
    const hop = visits[v];
    if (prev.ref !== visits[v + 1].ref || hop.end - hop.start > opts.maxFixes) continue;
    const back: MatchedFix[] = [];
    for (let i = hop.start; i < hop.end; i++) {
      const m = matched[i];
      const on = project(m, prev.ref);
      // A explains each fix within the noise, or at least as well as B does (a hop to the start of a T-junction)
      if (!on || !(on.distanceM <= opts.radiusM || on.distanceM <= m.distanceM + 0.5)) break;
      back.push({ seq: m.seq, ref: prev.ref, chainageM: on.chainageM, offsetM: on.offsetM, distanceM: on.distanceM, t: m.t });
    }
    if (back.length < hop.end - hop.start) continue;
    out ??= matched.slice();
    for (let k = 0; k < back.length; k++) out[hop.start + k] = back[k];
    folded += back.length;
  }
  return { fixes: out ?? matched, folded };
}

/** How far p lies beyond the end of the line (m, + past it), along the direction of the end segment. */
function overshoot(coords: LonLat[], atStart: boolean, p: LonLat): number {
  const [e, before] = atStart ? [coords[0], coords[1]] : [coords[coords.length - 1], coords[coords.length - 2]];
  const f = localFrame(e);
  const [bx, by] = f.toXY(before);
  const [px, py] = f.toXY(p);
  const n = Math.hypot(bx, by) || 1;
  return -(px * bx + py * by) / n;
}

/** An unmatched run of fixes; `from`/`to` is the end of the route it continues, when it starts or stops there. */
export interface UnmatchedRun {
  fixes: Fix[];
  from?: LonLat;
  to?: LonLat;
}

/**
 * A trench laid on past the end of a route: the matcher keeps the first fixes beyond the end on the route
 * (their nearest point is its end), and the unplanned run starts only where they leave its search radius.
 * Next to each unmatched run, the matched fixes that sit at their route's end and lie beyond it are handed
 * to the run, so the unplanned stretch starts where the plan stops. Fixes within `nearM` before the end
 * (noise about the end) stay on the route and do not stop the search; any other fix does.
 */
export function claimBeyondEnds(
  matched: MatchedFix[],
  unmatched: Fix[][],
  fixAt: (seq: number) => Fix,
  routes: Map<string, PlannedRouteInput>,
  opts: { nearM: number },
): { matched: MatchedFix[]; unmatched: UnmatchedRun[]; claimed: number } {
  const lengths = new Map<string, number>();
  const lengthOf = (ref: string, coords: LonLat[]) => lengths.get(ref) ?? (lengths.set(ref, lineLengthM(coords)), lengths.get(ref)!);
  /** beyond the start or end of its route (with that end's position), near one of them within nearM, or inside */
  const where = (m: MatchedFix): { at: 'beyond'; end: LonLat } | { at: 'near' | 'inside' } => {
    const r = routes.get(m.ref);
    if (!r || r.coords.length < 2) return { at: 'inside' };
    const length = lengthOf(m.ref, r.coords);
    const f = fixAt(m.seq);
    const p: LonLat = [f.lon, f.lat];
    if (m.chainageM < 0.05 && overshoot(r.coords, true, p) > 0) return { at: 'beyond', end: r.coords[0] };
    if (m.chainageM > length - 0.05 && overshoot(r.coords, false, p) > 0) return { at: 'beyond', end: r.coords[r.coords.length - 1] };
    return { at: m.chainageM <= opts.nearM || m.chainageM >= length - opts.nearM ? 'near' : 'inside' };
  };
  const runs = [...unmatched].sort((a, b) => a[0].seq - b[0].seq);
  const give = new Set<number>();
  const grown = runs.map((run, r) => {
    const lo = r > 0 ? runs[r - 1][runs[r - 1].length - 1].seq : -Infinity;
    const hi = r + 1 < runs.length ? runs[r + 1][0].seq : Infinity;
    const claim: Fix[] = [];
    const scan = (indices: number[]): LonLat | undefined => {
      let ref: string | null = null;
      let end: LonLat | undefined;
      for (const i of indices) {
        const m = matched[i];
        if (give.has(i) || (ref !== null && m.ref !== ref)) break;
        ref = m.ref;
        const w = where(m);
        if (w.at === 'inside') break;
        if (w.at === 'beyond') (give.add(i), claim.push(fixAt(m.seq)), (end = w.end));
      }
      return end;
    };
    const before: number[] = [];
    const after: number[] = [];
    matched.forEach((m, i) => {
      if (m.seq > lo && m.seq < run[0].seq) before.push(i);
      else if (m.seq > run[run.length - 1].seq && m.seq < hi) after.push(i);
    });
    const from = scan(before.reverse());
    const to = scan(after);
    return { fixes: [...claim, ...run].sort((a, b) => a.seq - b.seq), from, to };
  });
  const kept = give.size === 0 ? matched : matched.filter((_, i) => !give.has(i));
  // runs that now meet (a noisy fix in reach of the route's end had cut one walk in two) become one
  const merged: UnmatchedRun[] = [];
  for (const run of grown) {
    const last = merged[merged.length - 1];
    const between = last && kept.some((m) => m.seq > last.fixes[last.fixes.length - 1].seq && m.seq < run.fixes[0].seq);
    if (last && !between) (last.fixes.push(...run.fixes), (last.to = run.to));
    else merged.push(run);
  }
  return { matched: kept, unmatched: merged, claimed: give.size };
}

const addInterval = (out: Map<string, [number, number][]>, ref: string, a: number, b: number) => (out.get(ref) ?? out.set(ref, []).get(ref)!).push([a, b]);
const NONE: { node: number; at: number }[] = [];

/**
 * Where each route meets others, at which chainage on it. A node's routes are kept once each, in first-seen
 * order with their last-listed chainage (as a Map keyed by ref keeps them). Its lookups are methods, not
 * closures made per walk: V8 keeps a method's optimised code from call to call.
 */
class RouteJoins {
  readonly nodeRefs: string[][] = [];
  readonly nodeAts: number[][] = [];
  readonly joins = new Map<string, { node: number; at: number }[]>();

  constructor(graph: RouteGraph, readonly bridgeM: number) {
    for (const n of graph.nodes) {
      const refs: string[] = [];
      const ats: number[] = [];
      for (const r of n.routes) {
        const i = refs.indexOf(r.ref);
        if (i < 0) refs.push(r.ref), ats.push(r.chainageM);
        else ats[i] = r.chainageM;
      }
      const id = this.nodeRefs.push(refs) - 1;
      this.nodeAts.push(ats);
      for (const r of n.routes) (this.joins.get(r.ref) ?? this.joins.set(r.ref, []).get(r.ref)!).push({ node: id, at: r.chainageM });
    }
  }

  /** the chainage on `ref` nearest `c` (within bridgeM) where `other` joins it */
  junction(ref: string, other: string, c: number): number | undefined {
    let best: number | undefined;
    for (const j of this.joins.get(ref) ?? NONE) if (this.nodeRefs[j.node].includes(other) && Math.abs(j.at - c) <= this.bridgeM && (best === undefined || Math.abs(j.at - c) < Math.abs(best - c))) best = j.at;
    return best;
  }

  /** a route joining `ref` near c and `other` near cOther: where on `ref`, and the stretch of it walked across */
  across(ref: string, c: number, other: string, cOther: number): { at: number; via: string; from: number; to: number } | undefined {
    const { nodeRefs, nodeAts, bridgeM } = this;
    let best: { at: number; via: string; from: number; to: number; cost: number } | undefined;
    for (const j of this.joins.get(ref) ?? NONE) {
      if (Math.abs(j.at - c) > bridgeM) continue;
      const refs = nodeRefs[j.node];
      for (let r = 0; r < refs.length; r++) {
        const via = refs[r];
        const viaAt = nodeAts[j.node][r];
        if (via === ref || via === other) continue;
        const far = this.junction(via, other, viaAt);
        if (far === undefined) continue;
        // the other route's chainage at the first of via's junctions at that chainage
        let at: { node: number; at: number } | undefined;
        for (const x of this.joins.get(via) ?? NONE) {
          if (x.at !== far) continue;
          at = x;
          break;
        }
        const k = at ? nodeRefs[at.node].indexOf(other) : -1;
        if (k < 0) continue;
        const onOther = nodeAts[at!.node][k];
        if (Math.abs(onOther - cOther) > bridgeM) continue;
        const cost = Math.abs(j.at - c) + Math.abs(onOther - cOther) + Math.abs(far - viaAt);
        if (!best || cost < best.cost) best = { at: j.at, via, from: Math.min(viaAt, far), to: Math.max(viaAt, far), cost };
      }
    }
    return best && { at: best.at, via: best.via, from: best.from, to: best.to };
  }
}

/**
 * The chainage intervals a walk saw built on each route. Each visit's chainages are smoothed by a local
 * linear fit over ±k fixes, so its ends are estimated without the noise of its first and last fix (the raw
 * extremes overshoot by about σ). Where the walk came from, or went on to, another route, the visit's end is
 * put at their junction (the handover between routes is blurred by the noise, the junction is where the
 * trench turned; within `bridgeM`, as a signal gap is bridged). When the two routes do not meet but one
 * route joins both — a road crossing too short for a noisy walk to show — the walk crossed it: the visit's
 * end goes to that route's junction and the crossing is seen built between its two junctions. Otherwise an
 * end within `nearM` of the route's own end (`lengths`: each route's length by ref) goes to that end. A visit
 * also ends where the walk left the network (`offNetwork`: the seqs of its fixes in unplanned runs). Stays
 * closer than 2·nearM join; visits of fewer than `minFixes` fixes are noise about a junction and see nothing.
 * (Data, not callbacks: a callback made per reconciliation would throw V8's optimised code for this back.)
 *
 * walkedIntervals(matched, graph, { k: 5, bridgeM: 60, minFixes: 3, nearM: 7, lengths }).get('N1') → [[0, 212.4]]
 */
export function walkedIntervals(
  matched: { seq: number; ref: string; chainageM: number }[],
  graph: RouteGraph,
  opts: { k: number; bridgeM: number; minFixes: number; nearM: number; lengths: Map<string, number>; offNetwork?: Set<number> },
): Map<string, [number, number][]> {
  const visits = stays(matched, opts.minFixes, opts.offNetwork);
  const smooth = smoothedChainages(matched, visits, opts.k);
  const out = snappedIntervals(visits, smooth, new RouteJoins(graph, opts.bridgeM), opts.nearM, opts.lengths);
  // a few metres between two stays on a route are the blur of a handover (a hop onto a joining route and
  // back), not a gap in the trench: within 2·nearM they close; a stay that shrank to a point saw nothing
  for (const [ref, list] of out) {
    const merged: [number, number][] = [];
    for (const [a, b] of [...list].sort((x, y) => x[0] - y[0])) {
      const last = merged[merged.length - 1];
      if (last && a - last[1] <= 2 * opts.nearM) last[1] = Math.max(last[1], b);
      else merged.push([a, b]);
    }
    out.set(ref, merged.filter(([a, b]) => b - a >= 1));
  }
  return out;
}

// walkedIntervals' phases are functions of their own: V8 optimises each quickly and keeps its code from walk to walk

/** whether a fix with a seq strictly between a and b left the network */
function leftBetween(offNetwork: Set<number>, a: number, b: number): boolean {
  for (let q = a + 1; q < b; q++) if (offNetwork.has(q)) return true;
  return false;
}

/** The visits of at least minFixes fixes; a stay on a route also ends where the walk left the network in between (an unplanned run). */
function stays(matched: { seq: number; ref: string }[], minFixes: number, offNetwork: Set<number> | undefined): Visit[] {
  const visits: Visit[] = [];
  const off = offNetwork && offNetwork.size > 0 ? offNetwork : null;
  for (const v of splitVisits(matched)) {
    let start = v.start;
    if (off) for (let i = v.start + 1; i < v.end; i++) if (leftBetween(off, matched[i - 1].seq, matched[i].seq)) (i - start >= minFixes && visits.push({ ref: v.ref, start, end: i }), (start = i));
    if (v.end - start >= minFixes) visits.push(start === v.start ? v : { ref: v.ref, start, end: v.end });
  }
  return visits;
}

/** Each visit's chainages smoothed (a local linear fit over ±k fixes), in one column by matched index (visits do not overlap). */
function smoothedChainages(matched: { chainageM: number }[], visits: Visit[], k: number): Float64Array {
  const chain = new Float64Array(matched.length);
  for (let q = 0; q < matched.length; q++) chain[q] = matched[q].chainageM;
  const smooth = new Float64Array(matched.length);
  for (const v of visits) {
    const len = v.end - v.start;
    for (let i = 0; i < len; i++) smooth[v.start + i] = localLinearFrom(chain, v.start, i, Math.max(0, i - k), Math.min(len - 1, i + k));
  }
  return smooth;
}

/** Each visit's interval, its ends put at the junctions with the visits either side (or across a crossing, or at the route's end). */
function snappedIntervals(visits: Visit[], smooth: Float64Array, joins: RouteJoins, nearM: number, lengths: Map<string, number>): Map<string, [number, number][]> {
  const out = new Map<string, [number, number][]>();
  const snapped = smooth.slice();
  for (let n = 0; n < visits.length; n++) {
    const v = visits[n];
    const last = v.end - 1;
    const length = lengths.get(v.ref) ?? 0;
    // the visit's first fix meets the visit before, its last the one after
    for (let end = 0; end < 2; end++) {
      const i = end === 0 ? v.start : last;
      const other = end === 0 ? visits[n - 1] : visits[n + 1];
      const cOther = other === undefined ? undefined : end === 0 ? smooth[other.end - 1] : smooth[other.start];
      const c = smooth[i];
      const direct = other && other.ref !== v.ref ? joins.junction(v.ref, other.ref, c) : undefined;
      const via = other && other.ref !== v.ref && direct === undefined ? joins.across(v.ref, c, other.ref, cOther!) : undefined;
      if (via) addInterval(out, via.via, via.from, via.to);
      snapped[i] = direct ?? via?.at ?? (c <= nearM ? 0 : c >= length - nearM ? length : c);
    }
    let a = snapped[v.start];
    let b = snapped[v.start];
    for (let i = v.start + 1; i <= last; i++) {
      if (Math.abs(snapped[i] - snapped[i - 1]) > joins.bridgeM) (addInterval(out, v.ref, a, b), (a = b = snapped[i]));
      else (a = Math.min(a, snapped[i])), (b = Math.max(b, snapped[i]));
    }
    addInterval(out, v.ref, a, b);
  }
  return out;
}
