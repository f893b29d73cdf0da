import { describe, expect, it } from 'vitest';
import { makeCandidateIndex } from '@/lib/matching/candidates';
import { emissionLogProb, matchTrace } from '@/lib/matching/match-trace';
import type { MatchResult, MatchedFix } from '@/lib/matching/match-types';
import { buildRouteGraph } from '@/lib/matching/route-graph';
import { candidatesFor, viterbi } from '../../helpers/matching';
import { geo, gridScenario, metres, nearestXY, streetScenario, truthChainage, type TruthFix, type XY } from './scenario';

// Truth is known by construction (scenario.ts); every truth metric below is GeographicLib or planar scenario
// arithmetic, never lib/matching.

/**
 * A fix counts as matched correctly when it is on its truth route, or on a route that passes within 4 m (≈ σ)
 * of its true position: at a junction or on a 6.5 m crossing no matcher can tell the routes apart within one σ.
 * The two sides of a street stay apart: the true position is ≥ 5.5 m from the other side.
 */
function correct(h: TruthFix, m: MatchedFix | undefined, plan: Map<string, XY[]>): boolean {
  if (!m || h.ref === null) return false;
  return m.ref === h.ref || nearestXY(plan.get(m.ref)!, h.truthXY).d < 4;
}

const bySeq = (r: MatchResult) => new Map(r.matched.map((m) => [m.seq, m]));

describe('Newson & Krumm model', () => {
  it('emission is Gaussian in distance: at d = σ it is e^−½ = 0.6065 of d = 0 (Newson & Krumm 2009, eq. 1)', () => {
    for (const sigma of [0.05, 4, 10]) expect(Math.exp(emissionLogProb(sigma, sigma) - emissionLogProb(0, sigma))).toBeCloseTo(0.6065, 4);
  });

  it('viterbi picks the best path and restarts after a layer nothing can reach', () => {
    const em = [[0, -5], [-5, 0], [0, -1]];
    const r = viterbi([2, 2, 2], (k, j) => em[k][j], (k, i, j) => (k === 2 ? -Infinity : i === j ? 0 : -1));
    expect([...r.path]).toEqual([0, 1, 0]);
    expect(r.chainStarts).toEqual([0, 2]);
    // a strong transition overrides a weak emission
    expect([...viterbi([2, 2], (k, j) => [[0, -1], [-0.5, 0]][k][j], (_, i, j) => (i === j ? 0 : -10)).path]).toEqual([0, 0]);
  });
});

describe('the candidate search', () => {
  it('returns the best projection per route, nearest first, with geodesic chainage and a signed offset', () => {
    const sc = streetScenario(3);
    const index = makeCandidateIndex(sc.routes);
    const q: XY = [50, 1]; // 2.25 m south of N1 (drawn eastward: right, negative), 4.25 m north of S1
    const [lon, lat] = geo(q);
    const c = candidatesFor(index, { lon, lat }, 8, 5);
    expect(c.map((x) => x.ref)).toEqual(['N1', 'S1']);
    expect(c[0].distanceM).toBeCloseTo(metres(geo(q), geo([50, 3.25])), 3);
    expect(c[0].offsetM).toBeLessThan(0);
    expect(c[1].offsetM).toBeGreaterThan(0);
    expect(Math.abs(c[0].chainageM - truthChainage(sc.plan.get('N1')!, q))).toBeLessThan(1e-3);
    expect(candidatesFor(index, { lon, lat }, 8, 1)).toHaveLength(1);
    expect(candidatesFor(index, { lon, lat }, 16, 5).map((x) => x.ref)).toEqual(['N1', 'S1', 'V1']);
    expect(candidatesFor(index, { lon, lat }, 2, 5)).toHaveLength(0);
  });
});

describe('matchTrace on a street with both sides planned', () => {
  const sc = streetScenario(7);
  const graph = buildRouteGraph(sc.routes);

  it('matches ≥ 98 % of handheld fixes to the right route and side; the gap splits the track', () => {
    const r = matchTrace(sc.handheld.map((h) => h.fix), sc.routes, graph, { sigmaM: 4 });
    const m = bySeq(r);
    const walked = sc.handheld.filter((h) => h.ref !== null && !h.outlier);
    const ok = walked.filter((h) => correct(h, m.get(h.fix.seq), sc.plan)).length;
    expect(ok / walked.length).toBeGreaterThanOrEqual(0.98);
    // the side of the street, strictly: a fix on N1 or S1 is never put on the other side
    for (const h of walked) {
      const got = m.get(h.fix.seq)?.ref;
      if ((h.ref === 'N1' && got === 'S1') || (h.ref === 'S1' && got === 'N1')) expect.fail(`fix ${h.fix.seq} on ${h.ref} matched to ${got}`);
    }
    expect(r.pieces).toBe(2);
    const last = sc.handheld.filter((h) => h.fix.t! <= sc.gap[0]).length;
    expect(sc.handheld[last].fix.t! - sc.handheld[last - 1].fix.t!).toBeGreaterThan(30);
    // every fix is accounted for exactly once
    const seen = [...r.matched.map((x) => x.seq), ...r.unmatched.flat().map((f) => f.seq), ...r.outliers];
    expect(new Set(seen).size).toBe(sc.handheld.length);
    expect(seen).toHaveLength(sc.handheld.length);
    expect(r.matched.map((x) => x.seq)).toEqual([...r.matched.map((x) => x.seq)].sort((a, b) => a - b));
  });

  it('thins the recursion as Newson & Krumm do (fixes within 2σ of the last kept one) without losing accuracy', () => {
    // truth: the scenario's own route of each fix; the same trace matched with every fix in the recursion
    const walked = sc.handheld.filter((h) => h.ref !== null && !h.outlier);
    const share = (r: ReturnType<typeof matchTrace>) => {
      const m = bySeq(r);
      return walked.filter((h) => correct(h, m.get(h.fix.seq), sc.plan)).length / walked.length;
    };
    const thinned = matchTrace(sc.handheld.map((h) => h.fix), sc.routes, graph, { sigmaM: 4 });
    const full = matchTrace(sc.handheld.map((h) => h.fix), sc.routes, graph, { sigmaM: 4, thinM: 0 });
    expect(share(thinned)).toBeGreaterThanOrEqual(share(full) - 0.005);
    // every fix still placed: the skipped ones on their neighbours' route, none lost or doubled
    expect(thinned.matched.map((x) => x.seq)).toEqual(full.matched.map((x) => x.seq));
    expect(thinned.outliers).toEqual(full.outliers);
  });

  it('reports the unplanned extension as one unmatched run reaching its length (±20 %)', () => {
    const r = matchTrace(sc.handheld.map((h) => h.fix), sc.routes, graph, { sigmaM: 4 });
    const far = r.unmatched.filter((run) => run.length >= 3);
    expect(far.length).toBeGreaterThanOrEqual(1);
    const longest = far.reduce((a, b) => (b.length > a.length ? b : a));
    const end = geo(sc.extension.from);
    const reach = Math.max(...longest.map((f) => metres(end, [f.lon, f.lat])));
    expect(reach).toBeGreaterThan(0.8 * sc.extension.lengthM);
    expect(reach).toBeLessThan(1.2 * sc.extension.lengthM);
    // fixes of the run were walked on the extension
    const truth = new Map(sc.handheld.map((h) => [h.fix.seq, h]));
    for (const f of longest) expect(truth.get(f.seq)!.ref).toBeNull();
  });

  it('matches RTK survey points (t null, in order) to the right route with |chainage error| < 0.1 m', () => {
    const r = matchTrace(sc.rtk.map((h) => h.fix), sc.routes, graph, { sigmaM: 0.05 });
    const m = bySeq(r);
    let checked = 0;
    for (const h of sc.rtk) {
      if (h.ref === null) continue;
      const got = m.get(h.fix.seq);
      expect(got, `RTK point ${h.fix.seq}`).toBeDefined();
      // at a T-junction the as-built end of one route can sit nearer the other route: either is right there
      const nearOther = [...sc.plan].some(([ref, pts]) => ref !== h.ref && nearestXY(pts, h.truthXY).d < 1.05);
      if (got!.ref !== h.ref) {
        expect(nearOther, `RTK point ${h.fix.seq} on ${h.ref} matched to ${got!.ref}`).toBe(true);
        continue;
      }
      expect(Math.abs(got!.chainageM - truthChainage(sc.plan.get(h.ref)!, h.truthXY))).toBeLessThan(0.1);
      checked++;
    }
    expect(checked).toBeGreaterThan(0.95 * sc.rtk.filter((h) => h.ref !== null).length);
    // the extension beyond the 10 m radius: one run, reaching 40 m from the dead end
    expect(r.unmatched).toHaveLength(1);
    const end = geo(sc.extension.from);
    expect(Math.max(...r.unmatched[0].map((f) => metres(end, [f.lon, f.lat])))).toBeCloseTo(40, 1);
    expect(r.outliers).toEqual([]);
  });

  it('places the detour by its lateral offset, left of N1', () => {
    const r = matchTrace(sc.rtk.map((h) => h.fix), sc.routes, graph, { sigmaM: 0.05 });
    const m = bySeq(r);
    const peak = sc.rtk.filter((h) => h.ref === 'N1').map((h) => m.get(h.fix.seq)!).filter((x) => x.ref === 'N1' && x.chainageM > 130 && x.chainageM < 135);
    expect(peak.length).toBeGreaterThan(0);
    for (const x of peak) expect(x.offsetM).toBeGreaterThan(3.5);
  });
});

describe('matchTrace on a 2,000-route network', () => {
  it('drops ≥ 90 % of the injected 15–40 m outliers, never puts one on a far route, and completes 100,000 fixes', () => {
    const gs = gridScenario(11, { blocks: 7, fixes: 100_000 });
    expect(gs.routes.length).toBe(2000);
    expect(gs.totalLengthM).toBeGreaterThan(25_000);
    expect(gs.totalLengthM).toBeLessThan(35_000);
    const graph = buildRouteGraph(gs.routes);
    const r = matchTrace(gs.handheld.map((h) => h.fix), gs.routes, graph, { sigmaM: 4 });
    expect(r.matched.length + r.outliers.length + r.unmatched.flat().length).toBe(gs.handheld.length);
    const dropped = new Set(r.outliers);
    const injected = gs.handheld.filter((h) => h.outlier);
    expect(injected.length).toBeGreaterThan(800);
    expect(injected.filter((h) => dropped.has(h.fix.seq)).length / injected.length).toBeGreaterThanOrEqual(0.9);
    const m = bySeq(r);
    for (const h of injected) {
      const got = m.get(h.fix.seq);
      // far: beyond the 16 m search radius (4σ) from where the walker really was, i.e. where the spike pointed
      if (got) expect(nearestXY(gs.plan.get(got.ref)!, h.truthXY).d, `outlier ${h.fix.seq} on ${got.ref}`).toBeLessThan(16);
    }
    // false drops stay rare
    expect(r.outliers.length - injected.filter((h) => dropped.has(h.fix.seq)).length).toBeLessThan(0.01 * gs.handheld.length);
    // on the network: every matched fix's true position is on or near the matched route
    let near = 0;
    for (const h of gs.handheld) {
      const got = m.get(h.fix.seq);
      if (got && !h.outlier && nearestXY(gs.plan.get(got.ref)!, h.truthXY).d < 12) near++;
    }
    expect(near / gs.handheld.length).toBeGreaterThan(0.95);
  }, 120_000);
});
