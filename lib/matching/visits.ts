import { lineLengthM, localFrame } from './chainage';
import { signedOffset } from './offset-profile';
import type { Fix, MatchedFix } from './match-types';
import type { LonLat, PlannedRouteInput } from './types';

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
 * either. A short visit to B between two visits of A whose fixes all lie within `radiusM` of A is such a
 * hop: its fixes are put back on A (projected), so B does not gain a false stretch of trench. A real walk
 * along B leaves A's reach, or arrives from a third route.
 */
export function foldJunctionHops(
  matched: MatchedFix[],
  position: (seq: number) => LonLat,
  routes: Map<string, PlannedRouteInput>,
  opts: { radiusM: number; maxFixes: number },
): { fixes: MatchedFix[]; folded: number } {
  const visits = splitVisits(matched);
  const out = [...matched];
  let folded = 0;
  for (let v = 1; v + 1 < visits.length; v++) {
    const [prev, hop, next] = [visits[v - 1], visits[v], visits[v + 1]];
    if (prev.ref !== next.ref || hop.end - hop.start > opts.maxFixes) continue;
    const home = routes.get(prev.ref);
    if (!home) continue;
    const back = out.slice(hop.start, hop.end).map((m) => ({ m, on: signedOffset(home.coords, position(m.seq)) }));
    if (!back.every((b) => b.on.distanceM <= opts.radiusM)) continue;
    back.forEach((b, k) => (out[hop.start + k] = { ...b.m, ref: home.ref, ...b.on }));
    folded += back.length;
  }
  return { fixes: out, folded };
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
): { matched: MatchedFix[]; unmatched: Fix[][]; claimed: number } {
  const lengths = new Map<string, number>();
  const lengthOf = (ref: string, coords: LonLat[]) => lengths.get(ref) ?? (lengths.set(ref, lineLengthM(coords)), lengths.get(ref)!);
  /** 'beyond' the start or end of its route, 'near' one of them within nearM, or 'inside' */
  const where = (m: MatchedFix): 'beyond' | 'near' | 'inside' => {
    const r = routes.get(m.ref);
    if (!r || r.coords.length < 2) return 'inside';
    const length = lengthOf(m.ref, r.coords);
    const f = fixAt(m.seq);
    const p: LonLat = [f.lon, f.lat];
    if ((m.chainageM < 0.05 && overshoot(r.coords, true, p) > 0) || (m.chainageM > length - 0.05 && overshoot(r.coords, false, p) > 0)) return 'beyond';
    return m.chainageM <= opts.nearM || m.chainageM >= length - opts.nearM ? 'near' : 'inside';
  };
  const runs = [...unmatched].sort((a, b) => a[0].seq - b[0].seq);
  const give = new Set<number>();
  const grown = runs.map((run, r) => {
    const lo = r > 0 ? runs[r - 1][runs[r - 1].length - 1].seq : -Infinity;
    const hi = r + 1 < runs.length ? runs[r + 1][0].seq : Infinity;
    const claim: Fix[] = [];
    const scan = (indices: number[]) => {
      let ref: string | null = null;
      for (const i of indices) {
        const m = matched[i];
        if (give.has(i) || (ref !== null && m.ref !== ref)) break;
        ref = m.ref;
        const w = where(m);
        if (w === 'inside') break;
        if (w === 'beyond') (give.add(i), claim.push(fixAt(m.seq)));
      }
    };
    const before: number[] = [];
    const after: number[] = [];
    matched.forEach((m, i) => {
      if (m.seq > lo && m.seq < run[0].seq) before.push(i);
      else if (m.seq > run[run.length - 1].seq && m.seq < hi) after.push(i);
    });
    scan(before.reverse());
    scan(after);
    return [...claim, ...run].sort((a, b) => a.seq - b.seq);
  });
  const kept = matched.filter((_, i) => !give.has(i));
  // runs that now meet (a noisy fix in reach of the route's end had cut one walk in two) become one
  const merged: Fix[][] = [];
  for (const run of grown) {
    const last = merged[merged.length - 1];
    const between = last && kept.some((m) => m.seq > last[last.length - 1].seq && m.seq < run[0].seq);
    if (last && !between) last.push(...run);
    else merged.push(run);
  }
  return { matched: kept, unmatched: merged, claimed: give.size };
}
