import { describe, expect, it } from 'vitest';
import { accuracyStatement, sourceLabel } from '@/lib/handover/accuracy';

// The package's accuracy statement (issue 16): a worked example added up by hand.
describe('accuracy statement by radius band and by source class', () => {
  const rows = [
    { lengthM: 120, radius95M: 0.05, classes: ['rtk_gnss' as const] },
    { lengthM: 80, radius95M: 0.05, classes: ['rtk_gnss' as const, 'rtk_gnss' as const] },
    { lengthM: 5, radius95M: 0.1, classes: ['rtk_gnss' as const] }, // on the band's edge: counted in ≤ 0.1 m
    { lengthM: 9, radius95M: 9.79, classes: ['handheld_gnss' as const] },
    { lengthM: 30, radius95M: 2, classes: ['rtk_gnss' as const, 'handheld_gnss' as const] },
    { lengthM: 10, radius95M: null, classes: [] },
  ];
  const s = accuracyStatement(rows);

  it('adds the metres of each 95 % radius band, unknown apart (worked by hand: 205, 0, 0, 30, 9, 10 m)', () => {
    expect(s.bands).toEqual([
      { radius95: '≤ 0.1 m', metres: 205 }, { radius95: '≤ 0.5 m', metres: 0 }, { radius95: '≤ 1 m', metres: 0 },
      { radius95: '≤ 5 m', metres: 30 }, { radius95: '> 5 m', metres: 9 }, { radius95: 'unknown (not measured)', metres: 10 },
    ]);
    expect(s.bands.reduce((a, b) => a + b.metres, 0)).toBe(254);
  });

  it('groups by the classes a section came from, a mixed section under its combination, largest first', () => {
    expect(s.bySource.map((g) => [g.source, g.metres, g.sections])).toEqual([
      ['RTK GNSS', 205, 3], ['Handheld GNSS + RTK GNSS', 30, 1], ['No source upload', 10, 1], ['Handheld GNSS', 9, 1],
    ]);
    const rtk = s.bySource[0];
    // length-weighted mean radius: (120 × 0.05 + 80 × 0.05 + 5 × 0.1) / 205 = 10.5 / 205 = 0.05122 m
    expect(rtk.radius95).toEqual({ min: 0.05, max: 0.1, lengthWeightedMean: 0.051 });
    expect(rtk.bands).toEqual([{ radius95: '≤ 0.1 m', metres: 205 }]);
    expect(s.bySource[2].radius95).toBeNull();
    expect(s.bySource[2].bands).toEqual([{ radius95: 'unknown (not measured)', metres: 10 }]);
  });

  it('names a combination in the catalogue order, whatever order the uploads came in', () => {
    expect(sourceLabel(['rtk_gnss', 'handheld_gnss'])).toBe(sourceLabel(['handheld_gnss', 'rtk_gnss']));
    expect(sourceLabel([])).toBe('No source upload');
  });
});
