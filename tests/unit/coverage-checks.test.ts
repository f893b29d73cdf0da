import { describe, expect, it } from 'vitest';
import { gapFindings, noBundleFindings, noDepthFindings, type BuiltStretch } from '@/lib/records/coverage-checks';

const s = (id: string, from: number, to: number, status: BuiltStretch['status'] = 'as_planned', routeId = 'r1'): BuiltStretch => ({ id, routeId, routeRef: routeId === 'r1' ? 'QN-101' : 'QN-102', status, fromChainageM: from, toChainageM: to });
const href = (x: BuiltStretch) => `/sections/${x.id}`;

describe('gaps between built stretches', () => {
  it('passes a route built end to end, and one whose gap is within the threshold', () => {
    expect(gapFindings([s('a', 0, 40), s('b', 40, 90, 'deviates')], 5, href)).toEqual([]);
    expect(gapFindings([s('a', 0, 40), s('b', 44, 90)], 5, href)).toEqual([]);
  });
  it('flags a not-built stretch between two built ones, not the unbuilt ends', () => {
    const f = gapFindings([s('x', 0, 10, 'not_built'), s('a', 10, 40), s('n', 40, 60, 'not_built'), s('b', 60, 90), s('y', 90, 140, 'not_built')], 5, href);
    expect(f).toHaveLength(1);
    expect(f[0]).toMatchObject({ check: 'gap_between_built', fromChainageM: 40, toChainageM: 60, href: '/sections/b' });
    expect(f[0].message).toContain('20.0 m between built stretches');
  });
  it('keeps routes apart', () => {
    expect(gapFindings([s('a', 0, 40), s('b', 60, 90, 'as_planned', 'r2')], 5, href)).toEqual([]);
  });
});

describe('built stretches with no depth reading', () => {
  it('passes a section with a reading on it (ends count) and flags one without', () => {
    const readings = new Map([['r1', [40]]]);
    expect(noDepthFindings([s('a', 0, 40), s('b', 40, 80)], readings, href)).toEqual([]);
    const f = noDepthFindings([s('a', 0, 39), s('b', 41, 80), s('n', 80, 100, 'not_built')], readings, href);
    expect(f.map((x) => x.recordId)).toEqual(['a', 'b']);
  });
});

describe('built stretches with no duct bundle', () => {
  it('passes a section covered by bundles end to end (within 0.5 m)', () => {
    expect(noBundleFindings([s('a', 0, 100)], new Map([['r1', [[0, 60], [60.3, 100]] as [number, number][]]]), href)).toEqual([]);
  });
  it('flags an uncovered section and a partly covered one with its first hole', () => {
    const f = noBundleFindings([s('a', 0, 100), s('b', 100, 150)], new Map([['r1', [[0, 30], [50, 100]] as [number, number][]]]), href);
    expect(f).toHaveLength(2);
    expect(f[0]).toMatchObject({ fromChainageM: 30, toChainageM: 50 });
    expect(f[0].message).toContain('20.0 m built with no duct bundle');
    expect(f[1].message).toContain('has no duct bundle recorded');
  });
});
