import geodesic from 'geographiclib-geodesic';
import { describe, expect, it } from 'vitest';
import { coverage } from '@/lib/matching/coverage';
import { diffPlans } from '@/lib/matching/plan-diff';
import type { LonLat, PlannedRouteInput } from '@/lib/matching/types';

// Moves are true ground distances: GeographicLib's direct problem [computed, GeographicLib].
const WGS84 = geodesic.Geodesic.WGS84;
const O: LonLat = [4.8952, 52.3702]; // Amsterdam

function geo(x: number, y: number): LonLat {
  const e = WGS84.Direct(O[1], O[0], 90, x);
  const n = WGS84.Direct(e.lat2!, e.lon2!, 0, y);
  return [n.lon2!, n.lat2!];
}

/** p moved `m` metres on the ground towards azimuth `azi` (degrees from north). */
function moved([lon, lat]: LonLat, m: number, azi = 0): LonLat {
  const r = WGS84.Direct(lat, lon, azi, m);
  return [r.lon2!, r.lat2!];
}

const route = (ref: string, pts: [number, number][], over: Partial<PlannedRouteInput> = {}): PlannedRouteInput => ({
  ref,
  street: 'Keizersgracht',
  ducts: '7x14mm',
  kind: 'street',
  coords: pts.map(([x, y]) => geo(x, y)),
  ...over,
});

const L: [number, number][] = [[0, 0], [40, 10], [90, 10], [120, 60]];
const shift = (r: PlannedRouteInput, m: number, azi = 0): PlannedRouteInput => ({ ...r, coords: r.coords.map((p) => moved(p, m, azi)) });

describe('coverage', () => {
  it('measures the stretch within r exactly, including far points between vertices', () => {
    // hand-computed [computed by hand]: b's first vertex disk reaches back to x = 5 − √(0.5² − 0.2²)
    const c = coverage([[0, 0], [10, 0]], [[5, 0.2], [20, 0.2]], 0.5);
    expect(c.coveredM).toBeCloseTo(5 + Math.sqrt(0.21), 12);
    expect(c.firstM).toBeCloseTo(5 - Math.sqrt(0.21), 12);
    expect(c.lastM).toBe(10);
    expect(c.full).toBe(false);
    // every vertex of a lies on b, yet (5, 0) is 1 m from it: a vertex-only Hausdorff would say 0
    const detour: [number, number][] = [[0, 0], [4, 0], [4, 5], [6, 5], [6, 0], [10, 0]];
    expect(coverage([[0, 0], [10, 0]], detour, 0.5)).toEqual({ coveredM: 9, firstM: 0, lastM: 10, full: false });
    expect(coverage([[0, 0], [10, 0]], detour, 1.001).full).toBe(true);
    expect(coverage(detour, [[0, 0], [10, 0]], 0.5).full).toBe(false);
  });
});

describe('diffPlans', () => {
  it('sorts every ref into exactly one of added, removed, reshaped, retagged, unchanged', () => {
    const before = ['R-1', 'R-2', 'R-3', 'R-4', 'R-5', 'R-6', 'R-8', 'R-9', 'R-10'].map((ref, i) => route(ref, L.map(([x, y]) => [x, y + i * 30] as [number, number])));
    const [r1, r2, r3, r4, r5, , r8, r9, r10] = before;
    const after: PlannedRouteInput[] = [
      route('R-7', [[0, -50], [50, -50]]), // new
      r10,
      shift(r2, 0.01, 45), // 1 cm: re-digitising noise
      shift(r3, 0.5), // 0.5 m
      { ...r4, coords: [...r4.coords].reverse() }, // reversed: chainage flips
      { ...r5, street: 'Herengracht' },
      { ...shift(r8, 0.5, 90), ducts: '12x10mm' }, // moved and retagged: the move wins
      { ...r9, kind: 'crossing' },
      { ...r1 },
    ];
    expect(diffPlans(before, after)).toEqual({
      added: ['R-7'],
      removed: ['R-6'],
      reshaped: ['R-3', 'R-4', 'R-8'],
      retagged: ['R-5', 'R-9'],
      unchanged: ['R-1', 'R-10', 'R-2'],
    });
  });

  it('draws the reshape line at reshapeM, measured anywhere along the line', () => {
    const base = route('A', L);
    const bend = (m: number): PlannedRouteInput => ({ ...base, coords: base.coords.map((p, i) => (i === 2 ? moved(p, m, 180) : p)) });
    expect(diffPlans([base], [bend(0.04)]).unchanged).toEqual(['A']);
    expect(diffPlans([base], [bend(0.06)]).reshaped).toEqual(['A']);
    expect(diffPlans([base], [bend(0.06)], { reshapeM: 0.1 }).unchanged).toEqual(['A']);
    // 0.5 m longer at the far end: every old point is still on the new line, but not the other way round
    const longer = { ...base, coords: [...base.coords.slice(0, 3), moved(base.coords[3], 0.5, WGS84.Inverse(base.coords[2][1], base.coords[2][0], base.coords[3][1], base.coords[3][0]).azi2!)] };
    expect(diffPlans([base], [longer]).reshaped).toEqual(['A']);
  });

  it('counts a new vertex as a reshape only when the shape really moves', () => {
    const base = route('A', [[0, 0], [100, 0]]);
    const [a, b] = base.coords;
    // lon/lat midpoint: on the old line to well under 1 mm over 100 m
    const mid: LonLat = [(a[0] + b[0]) / 2, (a[1] + b[1]) / 2];
    expect(diffPlans([base], [{ ...base, coords: [a, mid, b] }]).unchanged).toEqual(['A']);
    // a 1 cm kink with a new vertex is an edit, although a 1 cm shift of the same vertices is not
    expect(diffPlans([base], [{ ...base, coords: [a, moved(mid, 0.01), b] }]).reshaped).toEqual(['A']);
    expect(diffPlans([base], [shift(base, 0.01)]).unchanged).toEqual(['A']);
  });

  it('treats a repeated ref by its first occurrence and handles empty plans', () => {
    const a = route('A', L);
    expect(diffPlans([a, shift(a, 5)], [a])).toEqual({ added: [], removed: [], reshaped: [], retagged: [], unchanged: ['A'] });
    expect(diffPlans([], [a])).toEqual({ added: ['A'], removed: [], reshaped: [], retagged: [], unchanged: [] });
    expect(diffPlans([a], [])).toEqual({ added: [], removed: ['A'], reshaped: [], retagged: [], unchanged: [] });
  });
});
