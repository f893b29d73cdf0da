import geodesic from 'geographiclib-geodesic';
import { describe, expect, it } from 'vitest';
import { buildRouteSections } from '@/lib/matching/build-sections';
import { applyRouteCorrections, reassignFixes, splitPoints, type Correction } from '@/lib/matching/corrections';
import type { RouteObservations, SectionDraft } from '@/lib/matching/section-types';
import type { LonLat, PlannedRouteInput } from '@/lib/matching/types';

// Positions are placed and measured with GeographicLib (geodesic Direct/Inverse on WGS 84), never lib/matching.
const G = geodesic.Geodesic.WGS84;
const START: LonLat = [9.141, 52.121];
const point = (azi: number, s: number, left = 0, from = START): LonLat => {
  const p = G.Direct(from[1], from[0], azi, s);
  if (!left) return [p.lon2!, p.lat2!];
  const q = G.Direct(p.lat2!, p.lon2!, p.azi2! - 90, left);
  return [q.lon2!, q.lat2!];
};
const route: PlannedRouteInput = { ref: 'R-1', street: 'Tallow Street', ducts: null, kind: 'street', coords: [point(90, 0), point(90, 100)] };
const north: PlannedRouteInput = { ref: 'R-2', street: 'Wick Lane', ducts: null, kind: 'street', coords: [point(0, 0), point(0, 80)] };

/** RTK-grade observations of R-1 from `from` to `to` m, `left` m off the line. */
const rtk = (from: number, to: number, left = 0): RouteObservations => ({
  uploadId: 'u-rtk', sigmaM: 0.02, surveyGrade: true, laidOn: '2026-10-01',
  fixes: Array.from({ length: Math.floor((to - from) / 2) + 1 }, (_, i) => ({ chainageM: from + 2 * i, offsetM: left, t: null })),
});

describe('engineer corrections, applied by the section builder', () => {
  it('a split ends one section and starts the next at the nearest metre', () => {
    const cs: Correction[] = [{ id: 1, kind: 'split', ref: 'R-1', atM: 40.3 }];
    const drafts = applyRouteCorrections(route, buildRouteSections(route, [rtk(0, 100)], { toleranceM: 0.5, breaksM: splitPoints(cs, 'R-1') }), cs);
    expect(drafts.map((d) => [d.fromChainageM, Math.round(d.toChainageM)])).toEqual([[0, 40], [40, 100]]);
    expect(drafts.every((d) => d.status === 'as_planned' && d.correctionIds?.includes(1))).toBe(true);
    // each piece's length from its own line: GeographicLib on the pieces' ends, which lie on the straight route
    const [a, b] = drafts;
    const ends = (d: SectionDraft) => G.Inverse(d.coords[0][1], d.coords[0][0], d.coords.at(-1)![1], d.coords.at(-1)![0]).s12!;
    expect(a.lengthM).toBeCloseTo(ends(a), 1);
    expect(b.lengthM).toBeCloseTo(ends(b), 1);
    // a split of another route changes nothing here
    expect(splitPoints([{ id: 2, kind: 'split', ref: 'R-9', atM: 10 }], 'R-1')).toEqual([]);
  });

  it('a merge joins two built neighbours with the worse status and the looser figures', () => {
    const drafts = buildRouteSections(route, [rtk(0, 40), { ...rtk(40, 100, 1.2), uploadId: 'u-rtk-2', laidOn: '2026-10-03' }], { toleranceM: 0.5 });
    expect(drafts.map((d) => d.status)).toEqual(['as_planned', 'deviates']);
    const boundary = drafts[0].toChainageM;
    const [m] = applyRouteCorrections(route, drafts, [{ id: 3, kind: 'merge', ref: 'R-1', atM: boundary + 0.2 }]);
    expect(m.status).toBe('deviates');
    expect([m.fromChainageM, m.toChainageM]).toEqual([drafts[0].fromChainageM, drafts[1].toChainageM]);
    expect(m.maxOffsetM).toBe(Math.max(drafts[0].maxOffsetM, drafts[1].maxOffsetM));
    expect(m.p95OffsetM).toBe(Math.max(drafts[0].p95OffsetM, drafts[1].p95OffsetM));
    expect(m.accuracyM).toBe(Math.max(drafts[0].accuracyM, drafts[1].accuracyM));
    expect(m.sourceUploadIds).toEqual(['u-rtk', 'u-rtk-2']);
    expect(m.laidOn).toBe('2026-10-03');
    expect(m.correctionIds).toEqual([3]);
    // a merge where no boundary is left changes nothing
    expect(applyRouteCorrections(route, [m], [{ id: 4, kind: 'merge', ref: 'R-1', atM: 70 }])).toEqual([m]);
  });

  it('a merge never joins a built stretch with a not-built one', () => {
    const drafts = buildRouteSections(route, [rtk(0, 60)], { toleranceM: 0.5 });
    expect(drafts.map((d) => d.status)).toEqual(['as_planned', 'not_built']);
    expect(applyRouteCorrections(route, drafts, [{ id: 5, kind: 'merge', ref: 'R-1', atM: drafts[0].toChainageM }])).toEqual(drafts);
  });

  it('counts part of a not-built stretch built on another source and keeps the reason on the rest', () => {
    const drafts = buildRouteSections(route, [rtk(0, 40)], { toleranceM: 0.5 });
    const out = applyRouteCorrections(route, drafts, [
      { id: 6, kind: 'not_built_reason', ref: 'R-1', fromM: 40, toM: 100, reason: 'skip bin on the verge' },
      { id: 7, kind: 'mark_built', ref: 'R-1', fromM: 60, toM: 80, sourceUploadId: null, sigmaM: 1, laidOn: '2026-10-09', reason: 'paper record' },
    ]);
    const end = Math.round(drafts[0].toChainageM);
    expect(out.map((d) => [d.status, Math.round(d.fromChainageM), Math.round(d.toChainageM)])).toEqual([
      ['as_planned', 0, end], ['not_built', end, 60], ['as_planned', 60, 80], ['not_built', 80, 100],
    ]);
    const counted = out[2];
    // R95 = 2.4477 σ for a circular normal error [computed: sqrt(−2 ln 0.05)]
    expect(counted.accuracyM).toBeCloseTo(2.4477, 6);
    expect(counted.note).toBe('Counted built on another source: paper record');
    expect(counted.laidOn).toBe('2026-10-09');
    expect(counted.sourceUploadIds).toEqual([]);
    // the counted stretch lies on the planned line: GeographicLib distance of its ends from the route's points
    const d0 = G.Inverse(counted.coords[0][1], counted.coords[0][0], point(90, 60)[1], point(90, 60)[0]).s12!;
    expect(d0).toBeLessThan(0.01);
    expect(out[1].note).toBe('skip bin on the verge');
    expect(out[3].note).toBe('skip bin on the verge');
    expect(out[3].lengthM).toBeCloseTo(20, 1);
  });

  it('a reassignment projects the fixes onto the other route, with the side of the line', () => {
    const routes = new Map([[route.ref, route], [north.ref, north]]);
    // fixes 3 m east of R-2 (its right), at 20 and 30 m north; they were matched onto R-1 near its start
    const pos = new Map<number, LonLat>([[1, point(0, 20, -3)], [2, point(0, 30, -3)], [3, point(90, 70)]]);
    const matched = [
      { seq: 1, ref: 'R-1', chainageM: 3, offsetM: 20, distanceM: 20 },
      { seq: 2, ref: 'R-1', chainageM: 3, offsetM: 30, distanceM: 30 },
      { seq: 3, ref: 'R-1', chainageM: 70, offsetM: 0, distanceM: 0 },
    ];
    const { fixes, moved } = reassignFixes(matched, (s) => pos.get(s)!, routes, [{ id: 8, kind: 'reassign', ref: 'R-1', fromM: 0, toM: 10, targetRef: 'R-2' }]);
    expect(moved).toBe(2);
    expect(fixes[0].ref).toBe('R-2');
    expect(fixes[0].chainageM).toBeCloseTo(20, 1);
    expect(fixes[0].offsetM).toBeCloseTo(-3, 2);
    expect(fixes[1].chainageM).toBeCloseTo(30, 1);
    expect(fixes[2]).toEqual(matched[2]);
    // a reassignment to a route the plan no longer has changes nothing
    expect(reassignFixes(matched, (s) => pos.get(s)!, routes, [{ id: 9, kind: 'reassign', ref: 'R-1', fromM: 0, toM: 10, targetRef: 'GONE' }]).moved).toBe(0);
  });
});
