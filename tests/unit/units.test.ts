import { describe, expect, it } from 'vitest';
import { formatLength, METRES_PER_FOOT, METRES_PER_INCH } from '@/lib/records/units';

describe('length display', () => {
  it('uses the exact international inch and foot', () => {
    // 1 in = 25.4 mm, 1 ft = 0.3048 m exactly (1959 international agreement; NIST) [published]
    expect(METRES_PER_INCH).toBe(0.0254);
    expect(METRES_PER_FOOT).toBe(0.3048);
  });

  it('shows a typical slot depth in both systems', () => {
    // 48 cm ≈ 18.9 in: the typical micro-trench depth [practice]
    expect(formatLength(0.48, 'imperial')).toBe('18.9 in');
    expect(formatLength(0.48, 'metric')).toBe('0.48 m');
    expect(formatLength(3.048, 'imperial')).toBe('10.0 ft');
  });
});

describe('conversions both ways', () => {
  it('follow the exact definitions of NIST SP 811 (2008), appendix B [published]', async () => {
    const u = await import('@/lib/records/units');
    // 1 in = 25.4 mm exactly; 1 ft = 0.3048 m exactly
    expect(u.inToMm(1)).toBe(25.4);
    expect(u.ftToM(1)).toBe(0.3048);
    expect(u.mmToIn(25.4)).toBe(1);
    expect(u.mToFt(0.3048)).toBe(1);
    // t/°F = 1.8 t/°C + 32: water freezes at 32 °F and boils at 212 °F (at 1 atm) [published]
    expect(u.cToF(0)).toBe(32);
    expect(u.cToF(100)).toBe(212);
    expect(u.fToC(212)).toBe(100);
    expect(u.cToF(-40)).toBe(-40);
  });

  it('gives the trade check values', async () => {
    const u = await import('@/lib/records/units');
    // a slot 480 mm deep ≈ 18.9 in [practice, no source]; 24 mm wide ≈ 0.94 in
    expect(u.formatQuantity(0.48, 'depth', 'imperial')).toBe('18.9 in');
    expect(u.formatQuantity(24, 'small', 'imperial')).toBe('0.94 in');
    // hot bituminous material laid at about 195 °C = 383 °F [practice, no source; conversion NIST SP 811]
    expect(u.formatQuantity(195, 'temperature', 'imperial')).toBe('383 °F');
    expect(u.formatQuantity(195, 'temperature', 'metric')).toBe('195 °C');
    // the most common microduct outer diameters, 7, 14 and 16 mm [practice]
    expect(u.formatQuantity(16, 'small', 'imperial')).toBe('0.63 in');
    expect(u.formatQuantity(100, 'length', 'imperial')).toBe('328.1 ft');
  });

  it('round-trips a typed imperial value to the stored metric one', async () => {
    const u = await import('@/lib/records/units');
    for (const q of ['depth', 'small', 'length', 'temperature'] as const) {
      for (const v of [0, 0.4, 18.9, 383, 1234.5]) expect(u.toShown(u.fromShown(v, q, 'imperial'), q, 'imperial')).toBeCloseTo(v, 9);
      expect(u.fromShown(7, q, 'metric')).toBe(7);
    }
    expect(u.fromShown(18, 'depth', 'imperial')).toBeCloseTo(0.4572, 12);
    expect(u.formatQuantity(null, 'depth', 'metric')).toBe('—');
  });

  it('lets a person override the project', async () => {
    const u = await import('@/lib/records/units');
    expect(u.shownSystem(null, 'metric')).toBe('metric');
    expect(u.shownSystem('imperial', 'metric')).toBe('imperial');
  });
});
