import { describe, expect, it } from 'vitest';
import { complianceCounts, coverCompliance, coverShortfall, readingsBelowMinimum } from '@/lib/records/depth-compliance';
import { clearanceStatus, crossingsBelowClearance } from '@/lib/records/utility-clearance';
import { markedAsPit } from '@/lib/services/test-pits';

// Cover and clearance against the project's minimums. The figures are our own test data; 0.40 m is the
// demo project's minimum cover [practice: micro-trench cover is typically 0.2–0.6 m].
describe('cover compliance', () => {
  it('passes at and above the minimum, fails below it, and knows nothing without a cover', () => {
    expect(coverCompliance(0.45, 0.4)).toBe('pass');
    expect(coverCompliance(0.4, 0.4)).toBe('pass');
    // 0.1 + 0.3 is 0.30000000000000004 short of 0.4 in floating point: still the minimum
    expect(coverCompliance(0.1 + 0.3, 0.4)).toBe('pass');
    expect(coverCompliance(0.399, 0.4)).toBe('fail');
    expect(coverCompliance(0, 0.4)).toBe('fail');
    expect(coverCompliance(null, 0.4)).toBe('unknown');
    expect(coverShortfall(0.33, 0.4)).toBeCloseTo(0.07, 10);
    expect(coverShortfall(0.5, 0.4)).toBeNull();
    expect(complianceCounts([{ coverM: 0.5 }, { coverM: 0.3 }, { coverM: null }, { coverM: 0.41 }], 0.4)).toEqual({ pass: 2, fail: 1, unknown: 1 });
  });

  it('lists the readings below the minimum by route and chainage with their shortfall', () => {
    const r = (id: string, routeRef: string, chainageM: number, coverM: number | null) => ({ id, routeId: routeRef, routeRef, chainageM, coverM });
    const out = readingsBelowMinimum([r('a', 'QN-102', 10, 0.35), r('b', 'QN-101', 80, 0.38), r('c', 'QN-101', 20, 0.5), r('d', 'QN-101', 40, null), r('e', 'QN-101', 5, 0.2)], 0.4);
    expect(out.map((x) => x.id)).toEqual(['e', 'b', 'a']);
    expect(out[0].shortfallM).toBeCloseTo(0.2, 10);
    expect(readingsBelowMinimum([r('c', 'QN-101', 20, 0.5)], 0.4)).toEqual([]);
  });
});

describe('utility clearance', () => {
  it('warns below the minimum clearance only', () => {
    expect(clearanceStatus(0.12, 0.3)).toBe('below_minimum');
    expect(clearanceStatus(0.3, 0.3)).toBe('ok');
    expect(clearanceStatus(0.8, 0.3)).toBe('ok');
    expect(clearanceStatus(null, 0.3)).toBe('unknown');
    // a minimum of 0 means touching is tolerated
    expect(clearanceStatus(0, 0)).toBe('ok');
    const c = (id: string, chainageM: number, clearanceM: number | null) => ({ id, routeId: 'r', routeRef: 'QN-101', chainageM, clearanceM, utilityLabel: 'Gas' });
    expect(crossingsBelowClearance([c('a', 50, 0.1), c('b', 10, 0.2), c('c', 30, 0.5), c('d', 40, null)], 0.3).map((x) => x.id)).toEqual(['b', 'a']);
  });
});

describe('points marked as pits', () => {
  it('matches the code or GPX type exactly and a name beginning with the code and a number, case aside', () => {
    const p = (name: string | null, attributes: Record<string, unknown> = {}) => ({ name, attributes });
    expect(markedAsPit(p('7', { code: 'PIT' }), 'pit')).toBe(true);
    expect(markedAsPit(p('W7', { type: 'Pit' }), 'PIT')).toBe(true);
    expect(markedAsPit(p('PIT'), 'PIT')).toBe(true);
    expect(markedAsPit(p('pit 3'), 'PIT')).toBe(true);
    expect(markedAsPit(p('PIT-03'), 'PIT')).toBe(true);
    expect(markedAsPit(p('PIT3'), 'PIT')).toBe(true);
    expect(markedAsPit(p('PITCH'), 'PIT')).toBe(false);
    expect(markedAsPit(p('Hydrant', { code: 'PITX' }), 'PIT')).toBe(false);
    expect(markedAsPit(p(null), 'PIT')).toBe(false);
  });
});
