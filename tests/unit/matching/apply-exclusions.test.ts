import geodesic from 'geographiclib-geodesic';
import { describe, expect, it } from 'vitest';
import { applyExclusions } from '@/lib/matching/apply-exclusions';
import type { Fix } from '@/lib/matching/match-types';

// a clean trace due east, a fix every 10 m and every 10 s (positions by GeographicLib)
const trace: Fix[] = Array.from({ length: 11 }, (_, i) => {
  const p = geodesic.Geodesic.WGS84.Direct(52.1, 9.1, 90, i * 10);
  return { lon: p.lon2!, lat: p.lat2!, t: 1_800_000_000 + i * 10, seq: i };
});

describe('ranges left out of matching', () => {
  it('drops a time range and splits the trace there', () => {
    const pieces = applyExclusions(trace, [{ kind: 'time', fromT: 1_800_000_025, toT: 1_800_000_055 }]);
    expect(pieces.map((p) => p.map((f) => f.seq))).toEqual([[0, 1, 2], [6, 7, 8, 9, 10]]);
  });

  it('drops a distance range measured along the trace from its first fix', () => {
    const pieces = applyExclusions(trace, [{ kind: 'distance', fromM: 75, toM: 1000 }]);
    expect(pieces.map((p) => p.map((f) => f.seq))).toEqual([[0, 1, 2, 3, 4, 5, 6, 7]]);
  });

  it('leaves a trace without exclusions whole, and survey points without times alone in a time range', () => {
    expect(applyExclusions(trace, [])).toEqual([trace]);
    const points = trace.map((f) => ({ ...f, t: null }));
    expect(applyExclusions(points, [{ kind: 'time', fromT: 0, toT: 2e9 }])).toEqual([points]);
  });
});
