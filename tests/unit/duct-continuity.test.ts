import { describe, expect, it } from 'vitest';
import { continuityBreaks, countConnectors, ductChanges, installedAgainstPlanned, type ContinuityBundle, type ContinuityDuct } from '@/lib/records/duct-continuity';

const TIA = ['blue', 'orange', 'green', 'brown', 'slate', 'white', 'red', 'black', 'yellow', 'violet', 'rose', 'aqua'];
/** n ducts of 7/4 mm coloured 1…n in order, optionally with colours swapped at some positions */
const ducts = (n: number, colourAt: Record<number, number> = {}, size: [number, number | null] = [7, 4]): ContinuityDuct[] =>
  Array.from({ length: n }, (_, i) => {
    const c = colourAt[i + 1] ?? i + 1;
    return { position: i + 1, colourPosition: c, colourLabel: TIA[(c - 1) % 12] + (c > 12 ? ' with stripe' : ''), outerMm: size[0], innerMm: size[1] };
  });
const bundle = (id: string, from: number, to: number, d: ContinuityDuct[]): ContinuityBundle => ({ id, fromChainageM: from, toChainageM: to, ducts: d });

describe('duct continuity along a route', () => {
  it('passes ducts that keep colour, position and size from stretch to stretch, in any record order', () => {
    const bs = [bundle('c', 120, 200, ducts(12)), bundle('a', 0, 60, ducts(12)), bundle('b', 60, 120, ducts(12))];
    expect(continuityBreaks(bs, [])).toEqual([]);
  });

  it('finds a duct that changes colour where no joint is recorded', () => {
    const bs = [bundle('a', 0, 60, ducts(12)), bundle('b', 60, 140, ducts(12, { 3: 4, 4: 3 }))];
    const breaks = continuityBreaks(bs, []);
    expect(breaks).toHaveLength(1);
    expect(breaks[0]).toMatchObject({ fromChainageM: 60, toChainageM: 60, beforeBundleId: 'a', afterBundleId: 'b' });
    expect(breaks[0].changes).toEqual([
      { position: 3, kind: 'colour', before: 'green', after: 'brown' },
      { position: 4, kind: 'colour', before: 'brown', after: 'green' },
    ]);
    expect(breaks[0].message).toBe('At 60.0 m: duct 3 is green before and brown after; duct 4 is brown before and green after, with no joint or connector recorded there.');
  });

  it('lets a joint at the boundary (within a metre) excuse the ducts it names, and only those', () => {
    const bs = [bundle('a', 0, 60, ducts(12)), bundle('b', 60, 140, ducts(12, { 3: 4, 4: 3 }))];
    expect(continuityBreaks(bs, [{ id: 'j', chainageM: 60.8, kind: 'connector', positions: [3, 4] }])).toEqual([]);
    const partly = continuityBreaks(bs, [{ id: 'j', chainageM: 60.2, kind: 'joint', positions: [3] }]);
    expect(partly[0].changes.map((c) => c.position)).toEqual([4]);
    // a joint elsewhere on the route does not count here
    expect(continuityBreaks(bs, [{ id: 'j', chainageM: 62, kind: 'connector', positions: [3, 4] }])).toHaveLength(1);
  });

  it('compares across a gap between records, placing the break over the gap', () => {
    const bs = [bundle('a', 0, 50, ducts(7)), bundle('b', 58, 130, ducts(7, { 7: 8 }))];
    const [b] = continuityBreaks(bs, []);
    expect([b.fromChainageM, b.toChainageM]).toEqual([50, 58]);
    expect(b.message).toMatch(/^Between 50\.0 m and 58\.0 m: duct 7 is red before and black after/);
    expect(continuityBreaks(bs, [{ id: 'j', chainageM: 55, kind: 'joint', positions: [7] }])).toEqual([]);
  });

  it('names ducts that end, start or change size', () => {
    expect(ductChanges(ducts(4), ducts(3))).toEqual([{ position: 4, kind: 'ends', before: 'brown', after: null }]);
    expect(ductChanges(ducts(2), ducts(3))).toEqual([{ position: 3, kind: 'starts', before: null, after: 'green' }]);
    expect(ductChanges(ducts(1), ducts(1, {}, [14, 10]))).toEqual([{ position: 1, kind: 'size', before: '7/4 mm', after: '14/10 mm' }]);
    // a planned size without an inner diameter matches any inner
    expect(ductChanges(ducts(1, {}, [7, null]), ducts(1))).toEqual([]);
  });

  it('counts connectors and joints per route and per duct', () => {
    const c = countConnectors([
      { id: '1', chainageM: 10, kind: 'connector', positions: [1, 2] },
      { id: '2', chainageM: 80, kind: 'connector', positions: [2] },
      { id: '3', chainageM: 120, kind: 'joint', positions: [2, 2, 5] },
    ]);
    expect(c).toEqual({ connectors: 2, joints: 1, perDuct: [{ position: 1, count: 1 }, { position: 2, count: 3 }, { position: 5, count: 1 }], worstDuct: 3 });
    expect(countConnectors([])).toEqual({ connectors: 0, joints: 0, perDuct: [], worstDuct: 0 });
  });
});

describe('installed against planned, per stretch', () => {
  const plan = (d: ContinuityDuct[]) => [{ fromChainageM: 0, toChainageM: 280, ducts: d }];
  it('matches a stretch laid as planned; outer sizes only when the plan gives no inner', () => {
    expect(installedAgainstPlanned({ fromChainageM: 0, toChainageM: 60, ducts: ducts(12) }, plan(ducts(12, {}, [7, null])))).toMatchObject({ status: 'matches', planned: '12 × 7 mm', installed: '12 × 7/4 mm', message: 'As planned.' });
  });
  it('reports a different count and different sizes', () => {
    const r = installedAgainstPlanned({ fromChainageM: 0, toChainageM: 60, ducts: ducts(7) }, plan(ducts(12, {}, [7, null])));
    expect(r).toMatchObject({ status: 'differs', countDiffers: true, sizesDiffer: false, message: '7 ducts laid where the plan has 12.' });
    const s = installedAgainstPlanned({ fromChainageM: 0, toChainageM: 60, ducts: [...ducts(11), ...ducts(1, {}, [14, 10])] }, plan(ducts(12, {}, [7, 4])));
    expect(s).toMatchObject({ status: 'differs', countDiffers: false, sizesDiffer: true });
    expect(s.message).toBe("sizes 11 × 7/4 mm + 1 × 14/10 mm against the plan's 12 × 7/4 mm.");
  });
  it('says so where the plan has no ducts for the stretch', () => {
    expect(installedAgainstPlanned({ fromChainageM: 0, toChainageM: 60, ducts: ducts(2) }, [])).toMatchObject({ status: 'no_plan', planned: null });
  });
});
