import { describe, expect, it } from 'vitest';
import { bundleSummary, parseDuctSpec, sizeText } from '@/lib/records/duct-spec';

describe("the plan's ducts attribute", () => {
  it.each([
    ['12x7mm', [{ count: 12, outerMm: 7, innerMm: null }]],
    ['7x7mm', [{ count: 7, outerMm: 7, innerMm: null }]],
    ['1x14mm', [{ count: 1, outerMm: 14, innerMm: null }]],
    ['4x7mm', [{ count: 4, outerMm: 7, innerMm: null }]],
    ['2x14/10', [{ count: 2, outerMm: 14, innerMm: 10 }]],
    ['12x7/4', [{ count: 12, outerMm: 7, innerMm: 4 }]],
    ['12 × 7/3.5 mm', [{ count: 12, outerMm: 7, innerMm: 3.5 }]],
    ['12X7/3,5', [{ count: 12, outerMm: 7, innerMm: 3.5 }]],
    ['14/10', [{ count: 1, outerMm: 14, innerMm: 10 }]],
    ['12x7/4+2x14/10', [{ count: 12, outerMm: 7, innerMm: 4 }, { count: 2, outerMm: 14, innerMm: 10 }]],
    ['24x7mm; 1x16/12mm', [{ count: 24, outerMm: 7, innerMm: null }, { count: 1, outerMm: 16, innerMm: 12 }]],
    ['6x10/8, 2x7/4', [{ count: 6, outerMm: 10, innerMm: 8 }, { count: 2, outerMm: 7, innerMm: 4 }]],
  ])('reads %s', (text, groups) => {
    const r = parseDuctSpec(text);
    expect(r).toEqual({ ok: true, groups, total: groups.reduce((n, g) => n + g.count, 0) });
  });

  it.each([
    ['', /gives no ducts/],
    [null, /gives no ducts/],
    ['twelve ducts', /'twelve ducts' is not a duct size/],
    ['12x', /not a duct size/],
    ['0x7mm', /asks for no ducts/],
    ['12x7/9', /inner diameter must be above 0 and below the outer 7 mm/],
    ['12x700mm', /700 mm is not a microduct/],
    ['97x7mm', /97 ducts in one trench is more than 96/],
    ['12x7mm+', /not a duct size/],
  ])('refuses %s', (text, message) => {
    const r = parseDuctSpec(text);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toMatch(message);
  });

  it('writes sizes and bundles back in the trade’s short form', () => {
    expect(sizeText(7, 3.5)).toBe('7/3.5 mm');
    expect(sizeText(14, null)).toBe('14 mm');
    const d74 = { outerMm: 7, innerMm: 4 };
    expect(bundleSummary([d74, d74, { outerMm: 14, innerMm: 10 }, d74])).toBe('2 × 7/4 mm + 1 × 14/10 mm + 1 × 7/4 mm');
    expect(bundleSummary([])).toBe('no ducts');
  });
});
