import { describe, expect, it } from 'vitest';
import { matchSections, sameLine, type ExistingSection } from '@/lib/matching/match-sections';
import type { SectionDraft } from '@/lib/matching/section-types';

const draft = (from: number, to: number, status: SectionDraft['status'] = 'as_planned', ref: string | null = 'R-1', coords: [number, number][] = [[9.1, 52.1], [9.101, 52.1]]): SectionDraft => ({
  ref, fromChainageM: from, toChainageM: to, status, coords, lengthM: to - from, maxOffsetM: 0, p95OffsetM: 0, accuracyM: 1, sourceUploadIds: [], laidOn: null,
});
const existing = (id: string, d: SectionDraft): ExistingSection => ({ id, ref: d.ref, fromChainageM: d.fromChainageM, toChainageM: d.toChainageM, coords: d.coords, status: d.status });

describe('lasting section ids', () => {
  it('keeps the id of the same stretch, unchanged', () => {
    const a = draft(0, 100);
    expect(matchSections([a], [existing('s1', a)])).toEqual([{ keepId: 's1', derivedFrom: null, changed: false }]);
  });

  it('keeps the id when the stretch grows a little, and says it changed', () => {
    const old = draft(0, 100);
    const grown = draft(0, 120, 'as_planned', 'R-1', [[9.1, 52.1], [9.1012, 52.1]]);
    expect(matchSections([grown], [existing('s1', old)])).toEqual([{ keepId: 's1', derivedFrom: null, changed: true }]);
  });

  it('links both halves of a split to where they came from; the larger half keeps the id', () => {
    const old = draft(0, 100);
    const [a, b] = [draft(0, 60), draft(60, 100, 'deviates')];
    const ids = matchSections([a, b], [existing('s1', old)]);
    expect(ids[0]).toMatchObject({ keepId: 's1' });
    expect(ids[1]).toEqual({ keepId: null, derivedFrom: 's1', changed: true });
  });

  it('never hands one id to two drafts, nor matches across routes', () => {
    const old = draft(0, 100);
    const ids = matchSections([draft(0, 100), draft(0, 100, 'as_planned', 'R-2')], [existing('s1', old)]);
    expect(ids.filter((x) => x.keepId === 's1')).toHaveLength(1);
    expect(ids[1]).toEqual({ keepId: null, derivedFrom: null, changed: true });
  });

  it('compares lines vertex by vertex within 5 cm', () => {
    const a: [number, number][] = [[9.1, 52.1], [9.101, 52.1]];
    // 1e-7° of latitude is about 1.1 cm; 1e-6° about 11 cm
    expect(sameLine(a, [[9.1, 52.1000001], [9.101, 52.1]])).toBe(true);
    expect(sameLine(a, [[9.1, 52.100001], [9.101, 52.1]])).toBe(false);
    expect(sameLine(a, [...a, [9.102, 52.1]])).toBe(false);
  });
});
