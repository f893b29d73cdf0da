import geodesic from 'geographiclib-geodesic';
import { describe, expect, it } from 'vitest';
import { buildRouteSections } from '@/lib/matching/build-sections';
import type { RouteObservations } from '@/lib/matching/section-types';
import type { LonLat } from '@/lib/matching/types';
import { mulberry32 } from '@/lib/records/seeded-random';

// Truth is placed and measured with GeographicLib directly (geodesic Direct/Inverse on WGS 84), never with
// lib/matching: a straight planned route heading due east from a point in the fictional town.
const G = geodesic.Geodesic.WGS84;
const START: LonLat = [9.105, 52.105];
const LENGTH = 200;
const east = (c: number): LonLat => {
  const r = G.Direct(START[1], START[0], 90, c);
  return [r.lon2!, r.lat2!];
};
const truthPoint = (c: number, left: number): LonLat => {
  const p = east(c);
  const azi = G.Inverse(START[1], START[0], p[1], p[0]).azi2!;
  const r = G.Direct(p[1], p[0], azi - 90, left);
  return [r.lon2!, r.lat2!];
};
const dist = (a: LonLat, b: LonLat) => G.Inverse(a[1], a[0], b[1], b[0]).s12!;
const plan = { ref: 'R-1', coords: [east(0), east(100), east(LENGTH)] };

function rng(seed: number) {
  const u = mulberry32(seed);
  const normal = () => Math.sqrt(-2 * Math.log(u() + 1e-12)) * Math.cos(2 * Math.PI * u());
  return { u, normal };
}

/** A handheld walk along the truth at 1.3 m/s, 1 Hz: white noise σ per axis plus a mean-reverting bias. */
function handheld(seed: number, truthOffset: (c: number) => number, opts: { sigma?: number; from?: number; to?: number; skip?: [number, number] } = {}): RouteObservations {
  const r = rng(seed);
  const sigma = opts.sigma ?? 3.5;
  const [bx, by] = [0, 0];
  let bias = [bx, by];
  const fixes: RouteObservations['fixes'] = [];
  let t = 0;
  for (let c = opts.from ?? 0; c <= (opts.to ?? LENGTH); c += 1.3, t++) {
    // Ornstein–Uhlenbeck, 1 m per axis, τ = 60 s
    const a = Math.exp(-1 / 60);
    bias = bias.map((b) => a * b + Math.sqrt(1 - a * a) * 1.0 * r.normal());
    if (opts.skip && c > opts.skip[0] && c < opts.skip[1]) continue;
    fixes.push({ chainageM: c + bias[0] + sigma * r.normal(), offsetM: truthOffset(c) + bias[1] + sigma * r.normal(), t });
  }
  return { uploadId: `hand-${seed}`, sigmaM: sigma, surveyGrade: false, laidOn: '2026-11-03', fixes };
}

function rtk(seed: number, truthOffset: (c: number) => number, from = 0, to = LENGTH): RouteObservations {
  const r = rng(seed);
  const fixes: RouteObservations['fixes'] = [];
  for (let c = from; c <= to; c += 2) fixes.push({ chainageM: c + 0.02 * r.normal(), offsetM: truthOffset(c) + 0.02 * r.normal(), t: null });
  return { uploadId: `rtk-${seed}`, sigmaM: 0.02, surveyGrade: true, laidOn: '2026-11-04', fixes };
}

const lengthOf = (drafts: ReturnType<typeof buildRouteSections>, status: string) => drafts.filter((d) => d.status === status).reduce((n, d) => n + (d.toChainageM - d.fromChainageM), 0);

describe('as-built sections of one route', () => {
  it('counts a stretch a walk is known to have crossed without a fix on it built, on the plan (a short crossing)', () => {
    // truth: the interval the caller inferred (walkedIntervals' crossing rule), 40–46.5 m of the route
    const crossed: RouteObservations = { uploadId: 'walk', sigmaM: 3.5, surveyGrade: false, laidOn: '2026-11-04', fixes: [], intervals: [[40, 46.5]] };
    const drafts = buildRouteSections(plan, [crossed], { toleranceM: 0.5 });
    const built = drafts.filter((d) => d.status !== 'not_built');
    expect(built).toHaveLength(1);
    expect(built[0].status).toBe('as_planned');
    // sections are built from 1 m bins, a bin counted when its middle is within half a metre of the interval
    expect(Math.abs(built[0].fromChainageM - 40)).toBeLessThanOrEqual(1);
    expect(Math.abs(built[0].toChainageM - 46.5)).toBeLessThanOrEqual(1);
    expect(built[0].sourceUploadIds).toEqual(['walk']);
    expect(built[0].maxOffsetM).toBe(0);
    // the rest of the route is not built; the pieces cover it end to end
    expect(drafts.reduce((n, d) => n + (d.toChainageM - d.fromChainageM), 0)).toBeCloseTo(LENGTH, 6);
  });

  it('leaves a route walked as planned as_planned: 99 % of its length over 80 noisy walks', () => {
    let asPlanned = 0;
    let clean = 0;
    for (let seed = 1; seed <= 80; seed++) {
      const fraction = lengthOf(buildRouteSections(plan, [handheld(seed, () => 0)], { toleranceM: 0.5 }), 'as_planned') / LENGTH;
      asPlanned += fraction;
      if (fraction >= 0.99) clean++;
    }
    expect(asPlanned / 80).toBeGreaterThanOrEqual(0.99);
    // measured here: 79 of 80 walks entirely as_planned; a chance run of noise can still pass the run test
    expect(clean).toBeGreaterThanOrEqual(76);
  });

  it('finds most 6 m detours over 25 m in handheld traces (σ 3.5 m, 1 m drifting bias) and follows them', () => {
    const detour = (c: number) => (c >= 80 && c <= 105 ? 6 : 0);
    let found = 0;
    for (let seed = 1; seed <= 40; seed++) {
      const drafts = buildRouteSections(plan, [handheld(seed, detour)], { toleranceM: 0.5 });
      const dev = drafts.filter((d) => d.status === 'deviates');
      const overlap = dev.reduce((n, d) => n + Math.max(0, Math.min(d.toChainageM, 105) - Math.max(d.fromChainageM, 80)), 0);
      if (overlap >= 0.6 * 25) found++;
      // nothing far from the detour is called a deviation
      expect(dev.every((d) => d.toChainageM > 65 && d.fromChainageM < 120), `seed ${seed}`).toBe(true);
    }
    // the power of the test at this noise, measured: 26 of 40 walks; a detour this size is near the limit
    expect(found).toBeGreaterThanOrEqual(24);
  });

  it('calls a 1.5 × tolerance shift over 20 m in RTK points deviates, every time, with the measured line', () => {
    const shift = (c: number) => (c >= 60 && c <= 90 ? 0.75 : 0);
    for (let seed = 1; seed <= 10; seed++) {
      const drafts = buildRouteSections(plan, [rtk(seed, shift)], { toleranceM: 0.5 });
      const dev = drafts.filter((d) => d.status === 'deviates');
      expect(dev.length, `seed ${seed}`).toBe(1);
      expect(dev[0].fromChainageM).toBeGreaterThanOrEqual(58);
      expect(dev[0].toChainageM).toBeLessThanOrEqual(92);
      expect(Math.abs(dev[0].maxOffsetM - 0.75)).toBeLessThan(0.1);
      // every vertex of the as-built line lies on the truth within 0.1 m
      for (const d of drafts) for (const p of d.coords.slice(1, -1)) {
        const c = dist(START, p) * Math.cos(0); // due east: chainage ≈ distance from the start along the line
        const nearest = Math.min(...[-1, 0, 1].map((k) => dist(p, truthPoint(Math.round(c) + k * 0.5, shift(Math.round(c))))));
        expect(nearest).toBeLessThan(0.6);
      }
      expect(dev[0].accuracyM).toBeCloseTo(2.4477 * 0.02, 6);
    }
  });

  it('lets the more accurate source win where uploads overlap, without counting metres twice', () => {
    const drafts = buildRouteSections(plan, [handheld(3, () => 0), rtk(4, () => 0.1, 50, 120)], { toleranceM: 0.5 });
    const covered = drafts.filter((d) => d.status !== 'not_built').reduce((n, d) => n + d.toChainageM - d.fromChainageM, 0);
    expect(covered).toBeLessThanOrEqual(LENGTH + 1e-6);
    const rtkPart = drafts.filter((d) => d.accuracyM < 0.1);
    expect(rtkPart.reduce((n, d) => n + d.toChainageM - d.fromChainageM, 0)).toBeGreaterThan(65);
    expect(rtkPart.every((d) => d.sourceUploadIds.includes('rtk-4') && d.sourceUploadIds.includes('hand-3'))).toBe(true);
  });

  it('bridges a signal gap but reports a stretch nobody observed as not_built', () => {
    const drafts = buildRouteSections(plan, [handheld(5, () => 0, { to: 150, skip: [90, 130] })], { toleranceM: 0.5 });
    const notBuilt = drafts.filter((d) => d.status === 'not_built');
    expect(notBuilt).toHaveLength(1);
    expect(notBuilt[0].fromChainageM).toBeGreaterThan(140);
    expect(notBuilt[0].toChainageM).toBeCloseTo(LENGTH, 3);
    expect(lengthOf(drafts, 'as_planned')).toBeGreaterThan(140);
  });

  it('does not change a stretch for one 30 m outlier', () => {
    const walk = handheld(7, () => 0);
    walk.fixes[60] = { ...walk.fixes[60], offsetM: 30 };
    const drafts = buildRouteSections(plan, [walk], { toleranceM: 0.5 });
    expect(drafts.filter((d) => d.status === 'deviates')).toHaveLength(0);
  });

  it('measures laid length on the as-built line, within 1 % of the truth', () => {
    const drafts = buildRouteSections(plan, [rtk(9, () => 0.2)], { toleranceM: 0.5 });
    const laid = drafts.filter((d) => d.status !== 'not_built').reduce((n, d) => n + d.lengthM, 0);
    expect(Math.abs(laid - LENGTH) / LENGTH).toBeLessThan(0.01);
  });
});
