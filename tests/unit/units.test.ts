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
