import geodesic from 'geographiclib-geodesic';
import { describe, expect, it } from 'vitest';
import type { Fix, MatchedFix } from '@/lib/matching/match-types';
import { signedOffset } from '@/lib/matching/offset-profile';
import { unplannedLine } from '@/lib/matching/unplanned-line';
import { buildRouteGraph } from '@/lib/matching/route-graph';
import { claimBeyondEnds, foldJunctionHops, splitVisits, walkedIntervals } from '@/lib/matching/visits';
import type { LonLat, PlannedRouteInput } from '@/lib/matching/types';
import { mulberry32 } from '@/lib/records/seeded-random';

// Positions placed and measured with GeographicLib (geodesic Direct/Inverse on WGS 84), never lib/matching.
const G = geodesic.Geodesic.WGS84;
const O: LonLat = [9.151, 52.131];
const at = (azi: number, s: number, from = O): LonLat => {
  const p = G.Direct(from[1], from[0], azi, s);
  return [p.lon2!, p.lat2!];
};
const dist = (a: LonLat, b: LonLat) => G.Inverse(a[1], a[0], b[1], b[0]).s12!;
const A: PlannedRouteInput = { ref: 'A', street: null, ducts: null, kind: 'street', coords: [at(90, 0), at(90, 100)] };
// B leaves A at 50 m and runs 40 m north: a T-junction
const B: PlannedRouteInput = { ref: 'B', street: null, ducts: null, kind: 'street', coords: [at(90, 50), at(0, 40, at(90, 50))] };
const routes = new Map([['A', A], ['B', B]]);
const m = (seq: number, ref: string, chainageM: number, distanceM = 0): MatchedFix => ({ seq, ref, chainageM, offsetM: distanceM, distanceM, t: seq });

describe('visits of a walk to its routes', () => {
  it('cuts matched fixes into stays on one route', () => {
    expect(splitVisits([{ ref: 'A' }, { ref: 'A' }, { ref: 'B' }, { ref: 'A' }])).toEqual([
      { ref: 'A', start: 0, end: 2 }, { ref: 'B', start: 2, end: 3 }, { ref: 'A', start: 3, end: 4 },
    ]);
  });

  it('puts a hop onto the joining route back on the walked one when it stays within the noise', () => {
    // fixes along A past the junction; two of them, 2 m north of A, were matched to B's start
    const pos = new Map<number, LonLat>([[0, at(90, 46)], [1, at(0, 2, at(90, 49))], [2, at(0, 2, at(90, 51))], [3, at(90, 54)]]);
    const matched = [m(0, 'A', 46), m(1, 'B', 2, 1), m(2, 'B', 2, 1), m(3, 'A', 54)];
    const { fixes, folded } = foldJunctionHops(matched, (f, ref) => signedOffset(routes.get(ref)!.coords, pos.get(f.seq)!), { radiusM: 8, maxFixes: 10 });
    expect(folded).toBe(2);
    expect(fixes.map((f) => f.ref)).toEqual(['A', 'A', 'A', 'A']);
    expect(fixes[1].chainageM).toBeCloseTo(49, 1);
    // 2 m north of an eastward line is its left: + offset
    expect(fixes[1].offsetM).toBeCloseTo(2, 2);
  });

  it('keeps a real walk up the joining route, which leaves the walked one behind', () => {
    const pos = new Map<number, LonLat>([[0, at(90, 46)], [1, at(0, 10, at(90, 50))], [2, at(0, 20, at(90, 50))], [3, at(0, 10, at(90, 50))], [4, at(90, 54)]]);
    const matched = [m(0, 'A', 46), m(1, 'B', 10), m(2, 'B', 20), m(3, 'B', 10), m(4, 'A', 54)];
    expect(foldJunctionHops(matched, (f, ref) => signedOffset(routes.get(ref)!.coords, pos.get(f.seq)!), { radiusM: 8, maxFixes: 10 }).folded).toBe(0);
  });

  it('hands the fixes beyond a route end to the unplanned run that follows, across noise about the end', () => {
    // a walk east along A to its end, then 30 m on past it; the first 12 m beyond were kept on A's end
    const fixes: Fix[] = Array.from({ length: 40 }, (_, i) => ({ ...((p) => ({ lon: p[0], lat: p[1] }))(at(90, 70 + 1.5 * i)), t: i, seq: i }));
    const fixAt = (s: number) => fixes[s];
    const matched = fixes.slice(0, 28).map((f) => m(f.seq, 'A', Math.min(100, 70 + 1.5 * f.seq)));
    // noise put fix 22 (103 m) back before the end
    matched[22] = m(22, 'A', 98.5, 1);
    const run = fixes.slice(28);
    const out = claimBeyondEnds(matched, [run], fixAt, routes, { nearM: 7 });
    // fixes 21 (101.5 m) … 27 (110.5 m) lie beyond A's end at 100 m; fix 22 is noise about the end and stays
    expect(out.unmatched).toHaveLength(1);
    expect(out.unmatched[0].fixes[0].seq).toBe(21);
    expect(out.unmatched[0].fixes.map((f) => f.seq)).not.toContain(22);
    // the run now starts at the end of A, where the trench left the plan
    expect(out.unmatched[0].from).toEqual(A.coords[1]);
    expect(out.unmatched[0].to).toBeUndefined();
    expect(out.claimed).toBe(6);
    expect(out.matched.map((f) => f.seq)).toContain(22);
    expect(out.matched).toHaveLength(22);
  });

  it('joins two unplanned runs that a fix in reach of the end had cut apart', () => {
    const fixes: Fix[] = Array.from({ length: 12 }, (_, i) => ({ ...((p) => ({ lon: p[0], lat: p[1] }))(at(90, 101 + 2 * i)), t: i, seq: i }));
    const matched = [m(5, 'A', 100, 11)];
    const out = claimBeyondEnds(matched, [fixes.slice(0, 5), fixes.slice(6)], (s) => fixes[s], routes, { nearM: 7 });
    expect(out.unmatched).toHaveLength(1);
    expect(out.unmatched[0].fixes.map((f) => f.seq)).toEqual([...Array(12).keys()]);
    expect(out.matched).toHaveLength(0);
  });
});

describe('the intervals a walk saw built', () => {
  // A alone, 100 m: a walk along it at 1 m a fix (chainages as given, no noise)
  const graph = buildRouteGraph([A]);
  const lengths = new Map([['A', 100]]);
  const opts = { k: 5, bridgeM: 60, minFixes: 3, nearM: 7, lengths };
  const walk = (chainages: number[]) => chainages.map((c, i) => m(i, 'A', c));
  const range = (from: number, to: number) => Array.from({ length: to - from + 1 }, (_, i) => from + i);

  it('sees one stretch from end to end, the ends within nearM taken to the route ends', () => {
    expect(walkedIntervals(walk(range(3, 96)), graph, opts).get('A')).toEqual([[0, 100]]);
  });

  it('ends a stay where the walk left the network, though it came back to the same route within bridgeM', () => {
    // 0–40 m on A, then 10 fixes off the network (an unplanned run: seqs 41–50), back on A from 70 m
    const on = [...range(0, 40).map((c, i) => m(i, 'A', c)), ...range(70, 100).map((c, i) => m(51 + i, 'A', c))];
    const offNetwork = new Set(range(41, 50));
    expect(walkedIntervals(on, graph, { ...opts, offNetwork }).get('A')).toEqual([[0, 40], [70, 100]]);
    // without the run in between, the 30 m jump is bridged (a signal gap): one stretch
    expect(walkedIntervals(on, graph, opts).get('A')).toEqual([[0, 100]]);
  });
});

describe('the line of an unplanned stretch', () => {
  it('folds a walk out and back to one line, smooths and simplifies it to about the trench length', () => {
    const u = mulberry32(3);
    const n = () => Math.sqrt(-2 * Math.log(u() + 1e-12)) * Math.cos(2 * Math.PI * u());
    // 40 m out to the north-east and back at 1.3 m/s, σ 3 m per axis
    const walk: LonLat[] = [];
    for (let s = 0; s <= 40; s += 1.3) walk.push(at(45, s));
    for (let s = 40; s >= 0; s -= 1.3) walk.push(at(45, s));
    const noisy = walk.map((p) => at(0, 3 * n(), at(90, 3 * n(), p)));
    const line = unplannedLine(noisy, { k: 6, simplifyM: 2.4 });
    const len = line.slice(1).reduce((s, p, i) => s + dist(line[i], p), 0);
    // GeographicLib lengths: the trench is 40 m; a raw noisy polyline of the walk is several times that
    const raw = noisy.slice(1).reduce((s, p, i) => s + dist(noisy[i], p), 0);
    expect(raw).toBeGreaterThan(150);
    expect(len).toBeGreaterThan(32);
    expect(len).toBeLessThan(48);
    expect(dist(line[0], at(45, 0))).toBeLessThan(4);
    expect(dist(line[line.length - 1], at(45, 40))).toBeLessThan(5);
  });

  it('keeps a survey-grade run as measured', () => {
    const pts = [at(45, 0), at(45, 10), at(45, 20)];
    expect(unplannedLine(pts, { k: 0, simplifyM: 0 })).toEqual(pts);
  });
});
