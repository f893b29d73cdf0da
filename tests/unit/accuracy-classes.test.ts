import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { R95_FACTOR } from '@/lib/records/accuracy-classes';

const python = (code: string) => JSON.parse(execFileSync('python3', ['-c', code], { encoding: 'utf8' }));

describe('R95_FACTOR', () => {
  it('is √(−2 ln 0.05), the 95 % radius of a circular normal error per σ, to the 4 decimals it is stored with', () => {
    // [Python math] the Rayleigh quantile: 1 − exp(−r²/2) = 0.95
    const exact = python('import math, json; print(json.dumps(math.sqrt(-2 * math.log(0.05))))') as number;
    expect(Math.abs(R95_FACTOR - exact)).toBeLessThan(5e-5);
    // [published] the chi-square table's 95 % point for 2 degrees of freedom, 5.991: r² = χ²
    expect(Math.abs(R95_FACTOR * R95_FACTOR - 5.991)).toBeLessThan(5e-4);
  });

  it('holds 95 % of a seeded sample of circular normal errors [Python random.gauss]', () => {
    const inside = python(
      'import random, json; r = random.Random(20261205); n = 400000; ' +
        `print(json.dumps(sum(1 for _ in range(n) if r.gauss(0, 1) ** 2 + r.gauss(0, 1) ** 2 <= ${R95_FACTOR} ** 2) / n))`,
    ) as number;
    // binomial standard error at n = 400,000: √(0.95 × 0.05 / n) = 0.00034; four of them either side
    expect(Math.abs(inside - 0.95)).toBeLessThan(0.0014);
  });
});
