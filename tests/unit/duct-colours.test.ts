import { describe, expect, it } from 'vitest';
import { allDuctColours, ductColour, maxColourPosition, type ColourSequenceLike } from '@/lib/records/duct-colours';

// TIA-598 (Optical Fiber Cable Color Coding) [published]: the 12 colours in this order; 13–24 repeat them
// with a stripe (or tracer). The hex values are ours (screen renderings), not the standard's.
const TIA_598_ORDER = ['blue', 'orange', 'green', 'brown', 'slate', 'white', 'red', 'black', 'yellow', 'violet', 'rose', 'aqua'];
const tia: ColourSequenceLike = {
  repeatMarking: 'stripe',
  // stored out of order on purpose: the position decides, not the array order
  colours: TIA_598_ORDER.map((name, i) => ({ position: i + 1, name, hex: `#${(i + 1).toString(16).padStart(6, '0')}` })).reverse(),
};

describe('duct colours from a colour sequence', () => {
  it('gives positions 1–12 the TIA-598 colours in order', () => {
    expect(Array.from({ length: 12 }, (_, i) => ductColour(tia, i + 1)!.label)).toEqual(TIA_598_ORDER);
    expect(ductColour(tia, 1)).toEqual({ position: 1, name: 'blue', hex: '#000001', marking: null, label: 'blue' });
  });

  it('gives 13–24 the same base colours with the repeat marking', () => {
    expect(ductColour(tia, 13)!.label).toBe('blue with stripe');
    expect(ductColour(tia, 20)!.label).toBe('black with stripe');
    expect(ductColour(tia, 24)).toEqual({ position: 24, name: 'aqua', hex: '#00000c', marking: 'stripe', label: 'aqua with stripe' });
    expect(ductColour({ ...tia, repeatMarking: 'tracer' }, 14)!.label).toBe('orange with tracer');
  });

  it('refuses positions beyond the marked repeat, zero, negatives and fractions', () => {
    expect(maxColourPosition(tia)).toBe(24);
    for (const n of [25, 0, -1, 1.5, Number.NaN]) expect(ductColour(tia, n)).toBeNull();
    expect(ductColour({ repeatMarking: 'stripe', colours: [] }, 1)).toBeNull();
  });

  it('follows a shorter project sequence: 4 colours give 8 positions', () => {
    const four: ColourSequenceLike = { repeatMarking: 'tracer', colours: ['red', 'green', 'blue', 'white'].map((name, i) => ({ position: i + 1, name, hex: '#000000' })) };
    expect(allDuctColours(four).map((c) => c.label)).toEqual(['red', 'green', 'blue', 'white', 'red with tracer', 'green with tracer', 'blue with tracer', 'white with tracer']);
    expect(ductColour(four, 9)).toBeNull();
  });
});
