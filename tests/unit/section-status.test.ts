import { describe, expect, it } from 'vitest';
import { PLANNED_COLOUR, STATUS_STYLE } from '@/lib/records/section-status';

// Machado, Oliveira & Fernandes (2009), "A physiologically-based model for simulation of color vision
// deficiency", severity 1.0, applied to linear RGB [memory: the paper's published matrices]
const SIMULATIONS: Record<string, number[][]> = {
  protanopia: [[0.152286, 1.052583, -0.204868], [0.114503, 0.786281, 0.099216], [-0.003882, -0.048116, 1.051998]],
  deuteranopia: [[0.367322, 0.860646, -0.227968], [0.280085, 0.672501, 0.047413], [-0.01182, 0.04294, 0.968881]],
  tritanopia: [[1.255528, -0.076749, -0.178779], [-0.078411, 0.930809, 0.147602], [0.004733, 0.691367, 0.3039]],
};

// sRGB decoding (IEC 61966-2-1) and CIELAB under D65 (CIE 15) [published]
const linear = (c: number) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4);
const rgb = (hex: string) => [1, 3, 5].map((i) => linear(parseInt(hex.slice(i, i + 2), 16) / 255));
function lab([r, g, b]: number[]): number[] {
  const f = (t: number) => (t > 216 / 24389 ? Math.cbrt(t) : ((24389 / 27) * t + 16) / 116);
  const x = f((0.4124 * r + 0.3576 * g + 0.1805 * b) / 0.95047);
  const y = f(0.2126 * r + 0.7152 * g + 0.0722 * b);
  const z = f((0.0193 * r + 0.1192 * g + 0.9505 * b) / 1.08883);
  return [116 * y - 16, 500 * (x - y), 200 * (y - z)];
}
const simulate = (m: number[][], c: number[]) => m.map((row) => Math.min(1, Math.max(0, row[0] * c[0] + row[1] * c[1] + row[2] * c[2])));

describe('status colours', () => {
  it('stay apart (CIE76 ΔE of 15 or more) for normal vision and under simulated protanopia, deuteranopia and tritanopia', () => {
    // the planned route's blue is drawn under the sections on every map: it counts too
    const colours = { ...Object.fromEntries(Object.entries(STATUS_STYLE).map(([k, v]) => [k, v.colour])), planned: PLANNED_COLOUR };
    const close: string[] = [];
    for (const [name, m] of [['normal vision', null], ...Object.entries(SIMULATIONS)] as [string, number[][] | null][]) {
      const seen = Object.entries(colours).map(([k, hex]) => [k, lab(m ? simulate(m, rgb(hex)) : rgb(hex))] as const);
      for (let i = 0; i < seen.length; i++) {
        for (let j = i + 1; j < seen.length; j++) {
          const d = Math.hypot(...seen[i][1].map((v, q) => v - seen[j][1][q]));
          if (d < 15) close.push(`${name}: ${seen[i][0]} and ${seen[j][0]} ΔE ${d.toFixed(1)}`);
        }
      }
    }
    expect(close).toEqual([]);
  });

  it('catches a pair that colour-blind eyes confuse', () => {
    // the earlier light grey for not built against unplanned's reddish purple, under deuteranopia: 7 ΔE apart
    const d = Math.hypot(...lab(simulate(SIMULATIONS.deuteranopia, rgb('#999999'))).map((v, q) => v - lab(simulate(SIMULATIONS.deuteranopia, rgb(STATUS_STYLE.unplanned.colour)))[q]));
    expect(d).toBeLessThan(15);
  });
});
