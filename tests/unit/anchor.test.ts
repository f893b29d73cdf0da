import geodesic from 'geographiclib-geodesic';
import { describe, expect, it } from 'vitest';
import { chainageOnStretch, rangesOverlap, snapOnLine, stretchAnchorSchema } from '@/lib/records/anchor';
import { findingsOnStretch, summariseFindings, type CheckFinding } from '@/lib/records/quality-checks';

const G = geodesic.Geodesic.WGS84;

describe('snapping a point to a route', () => {
  it('gives the chainage and signed offset that GeographicLib places the point at', () => {
    // reference: geographiclib-geodesic (Karney) Direct problems, independent of the code under test
    const start: [number, number] = [9.104, 52.106];
    const east = G.Direct(start[1], start[0], 90, 200); // a straight 200 m route due east
    const line: [number, number][] = [start, [east.lon2!, east.lat2!]];
    const foot = G.Direct(start[1], start[0], 90, 73.25);
    const north = G.Direct(foot.lat2!, foot.lon2!, foot.azi2! - 90, 4.5); // 4.5 m to the left (north)
    const s = snapOnLine(line, [north.lon2!, north.lat2!]);
    expect(s.chainageM).toBeCloseTo(73.25, 2);
    expect(s.offsetM).toBeCloseTo(4.5, 2);
    const south = G.Direct(foot.lat2!, foot.lon2!, foot.azi2! + 90, 2);
    const r = snapOnLine(line, [south.lon2!, south.lat2!]);
    expect(r.offsetM).toBeCloseTo(-2, 2);
    expect(r.distanceM).toBeCloseTo(2, 2);
  });

  it('follows a bend: chainage runs along both legs', () => {
    const a: [number, number] = [9.104, 52.106];
    const b = G.Direct(a[1], a[0], 90, 100);
    const c = G.Direct(b.lat2!, b.lon2!, 0, 50);
    const line: [number, number][] = [a, [b.lon2!, b.lat2!], [c.lon2!, c.lat2!]];
    const p = G.Direct(b.lat2!, b.lon2!, 0, 30);
    const q = G.Direct(p.lat2!, p.lon2!, 90, 1); // 1 m east of the northward leg: its right
    const s = snapOnLine(line, [q.lon2!, q.lat2!]);
    expect(s.chainageM).toBeCloseTo(130, 1);
    expect(s.offsetM).toBeCloseTo(-1, 1);
  });
});

describe('stretches', () => {
  it('overlap only when they share more than a point', () => {
    expect(rangesOverlap(0, 10, 10, 20)).toBe(false);
    expect(rangesOverlap(0, 10.5, 10, 20)).toBe(true);
    expect(rangesOverlap(5, 6, 0, 20)).toBe(true);
    expect(chainageOnStretch(10, 10, 20)).toBe(true);
    expect(chainageOnStretch(20.01, 10, 20)).toBe(false);
  });

  it('refuses a stretch that ends before it starts, naming the field', () => {
    const r = stretchAnchorSchema.safeParse({ routeId: '00000000-0000-4000-8000-000000000001', fromChainageM: 40, toChainageM: 10 });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0].path).toEqual(['toChainageM']);
    expect(r.error!.issues[0].message).toMatch(/end after it starts/);
  });

  it('puts a finding on every section its stretch touches, and a point on both neighbours at their shared end', () => {
    const f = (from: number, to: number): CheckFinding => ({ check: 'cover_below_minimum', routeId: 'r', routeRef: 'QN-101', fromChainageM: from, toChainageM: to, message: '', href: '' });
    const findings = [f(35, 45), f(60, 60), { ...f(10, 10), routeRef: 'QN-102' }];
    expect(findingsOnStretch(findings, 'QN-101', 0, 40)).toHaveLength(1);
    expect(findingsOnStretch(findings, 'QN-101', 40, 60)).toHaveLength(2);
    expect(findingsOnStretch(findings, 'QN-101', 60, 80)).toHaveLength(1);
    expect(findingsOnStretch(findings, null, 0, 100)).toHaveLength(0);
    const sum = summariseFindings(findings);
    expect(sum.find((s) => s.check === 'cover_below_minimum')!.count).toBe(3);
    expect(sum.find((s) => s.check === 'no_duct_bundle')!.count).toBe(0);
  });
});
