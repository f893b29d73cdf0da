import { cumulativeChainage, lineLengthM, localFrame, pathLengthM, pointAtChainage } from './chainage';
import type { RouteObservations, SectionDraft, SectionOptions, SectionStatus } from './section-types';
import { Scratch } from './scratch';
import { SortedWindow, WindowExtremes } from './sliding-window';
import type { LonLat } from './types';
import { R95_FACTOR } from '../records/accuracy-classes';

/** two-sided 95 % normal quantile */
const Z95 = 1.96;
/** a 10 % trimmed mean's standard error is about 1.03 times the mean's, for normal noise */
const TRIM_EFFICIENCY = 1.03;
/** the standard error of a sample median is about √(π/2) ≈ 1.2533 times the mean's, for normal noise */
const MEDIAN_EFFICIENCY = 1.2533;
/** the stricter level a whole deviating run must pass (99.7 %) */
const Z_RUN = 3;

interface Bin {
  source: number; // index into sources, -1 when nothing observed
  anomaly: number; // bias-corrected smoothed lateral offset (m, + left)
  baseline: number; // the neighbourhood's offset the anomaly is measured from (m)
  se: number; // its standard error (m)
  residualBias: number; // the part of se that more fixes cannot shrink (m)
  deviates: boolean;
}

/** Mean without the extreme tenth at either end: nearly the mean's power, and one wild fix cannot move it. */
function trimmedMean(xs: number[]): number {
  // (a typed copy sorts numerically without a comparator, whatever kind of array xs is)
  const s = Float64Array.from(xs).sort();
  const k = Math.floor(s.length * 0.1);
  const kept = s.slice(k, s.length - k);
  return kept.reduce((n, x) => n + x, 0) / kept.length;
}

const quantile = (xs: number[], q: number) => {
  if (xs.length === 0) return 0;
  const s = Float64Array.from(xs).sort();
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil(q * s.length) - 1))];
};
const median = (xs: number[]) => quantile(xs, 0.5);

/**
 * Where the source saw a built trench: consecutive observations no further apart along the route than
 * `bridgeM`. Each end is widened by `endMarginM`, because the last fix of a noisy walk falls short of the
 * real end as often as it overshoots it.
 */
export function observedIntervals(fixes: RouteObservations['fixes'], bridgeM: number, endMarginM = 0): [number, number][] {
  const raw: [number, number][] = [];
  for (let i = 1; i < fixes.length; i++) {
    const a = fixes[i - 1].chainageM;
    const b = fixes[i].chainageM;
    if (Math.abs(b - a) <= bridgeM) raw.push([Math.min(a, b) - endMarginM, Math.max(a, b) + endMarginM]);
  }
  raw.sort((x, y) => x[0] - y[0]);
  const out: [number, number][] = [];
  for (const r of raw) {
    const last = out[out.length - 1];
    if (last && r[0] <= last[1]) last[1] = Math.max(last[1], r[1]);
    else out.push([r[0], r[1]]);
  }
  return out;
}

/** A point `offsetM` to the left (+) or right (−) of the route at `chainageM`, e.g. the as-built line beside the plan. */
export function offsetPoint(coords: LonLat[], chainageM: number, offsetM: number): LonLat {
  const length = lineLengthM(coords);
  const p = pointAtChainage(coords, chainageM);
  const a = pointAtChainage(coords, Math.max(0, chainageM - 0.5));
  const b = pointAtChainage(coords, Math.min(length, chainageM + 0.5));
  const f = localFrame(p);
  const [ax, ay] = f.toXY(a);
  const [bx, by] = f.toXY(b);
  const n = Math.hypot(bx - ax, by - ay) || 1;
  // metres per degree at p, from the frame itself, to step back from metres to degrees
  const kx = f.toXY([p[0] + 1e-4, p[1]])[0] / 1e-4;
  const ky = f.toXY([p[0], p[1] + 1e-4])[1] / 1e-4;
  const [nx, ny] = [-(by - ay) / n, (bx - ax) / n];
  return [p[0] + (nx * offsetM) / kx, p[1] + (ny * offsetM) / ky];
}

/** The planned line between two chainages, with its vertices. */
export function subLine(coords: LonLat[], from: number, to: number): LonLat[] {
  const chain = cumulativeChainage(coords);
  const out: LonLat[] = [pointAtChainage(coords, from)];
  for (let i = 0; i < coords.length; i++) if (chain[i] > from && chain[i] < to) out.push(coords[i]);
  out.push(pointAtChainage(coords, to));
  return out;
}

const margin = (s: RouteObservations, o: Required<SectionOptions>) => (s.surveyGrade ? 0 : Math.min(s.sigmaM, o.bridgeM / 2));
/** Where the source saw the trench: as its caller estimated it, else from its fixes with a margin at each end. */
const seen = (s: RouteObservations, o: Required<SectionOptions>) => s.intervals ?? observedIntervals(s.fixes, o.bridgeM, margin(s, o));

/**
 * Fixes sorted by chainage, as columns: each bin's windows are then index ranges, their bounds walked
 * forward as the bins go. The ranges hold exactly the fixes that `Math.abs(chainage − c) <= w` keeps, in
 * the same order, since that distance falls monotonically towards c on either side.
 */
interface SortedFixes {
  chainage: Float64Array;
  offset: Float64Array;
  /** NaN where the fix has no time */
  t: Float64Array;
}

/**
 * Indices 0 … n − 1 in ascending order of keys, equal keys in index order (what a stable sort by key gives):
 * a bottom-up merge sort of indices, since a comparator sort of the fix objects costs a call a comparison.
 */
export function stableOrder(keys: Float64Array, scratch?: Scratch): Int32Array {
  const n = keys.length;
  let a = scratch ? scratch.i32(n) : new Int32Array(n);
  let b = scratch ? scratch.i32(n) : new Int32Array(n);
  for (let i = 0; i < n; i++) a[i] = i;
  for (let width = 1; width < n; width *= 2) {
    for (let lo = 0; lo < n; lo += 2 * width) {
      const mid = Math.min(lo + width, n);
      const hi = Math.min(lo + 2 * width, n);
      let i = lo;
      let j = mid;
      let k = lo;
      // the left run's element first unless the right one is strictly smaller: stable
      while (i < mid && j < hi) b[k++] = keys[a[j]] < keys[a[i]] ? a[j++] : a[i++];
      while (i < mid) b[k++] = a[i++];
      while (j < hi) b[k++] = a[j++];
    }
    const t = a;
    a = b;
    b = t;
  }
  return a;
}

function sortedColumns(fixes: RouteObservations['fixes'], scratch: Scratch): SortedFixes {
  const n = fixes.length;
  // the objects read once, in their order (a read in chainage order jumps about the heap), then permuted as columns
  const keys = scratch.f64(n);
  const offsets = scratch.f64(n);
  const times = scratch.f64(n);
  for (let i = 0; i < n; i++) {
    const f = fixes[i];
    (keys[i] = f.chainageM), (offsets[i] = f.offsetM), (times[i] = f.t ?? NaN);
  }
  const order = stableOrder(keys, scratch);
  const out: SortedFixes = { chainage: scratch.f64(n), offset: scratch.f64(n), t: scratch.f64(n) };
  for (let i = 0; i < n; i++) {
    const j = order[i];
    (out.chainage[i] = keys[j]), (out.offset[i] = offsets[j]), (out.t[i] = times[j]);
  }
  return out;
}

/**
 * First index whose chainage is not more than w below c, walked on from `p`, the answer for a smaller c:
 * the bins ask with c rising metre by metre, and the answer never moves back (c − chainage only grows
 * with c, under rounding too), so each index is passed once per source.
 */
function windowStart(ch: Float64Array, c: number, w: number, p: number): number {
  while (p < ch.length && ch[p] < c && Math.abs(ch[p] - c) > w) p++;
  return p;
}

/** First index whose chainage is more than w above c, walked on from `p`, the answer for a smaller c. */
function windowEnd(ch: Float64Array, c: number, w: number, p: number): number {
  while (p < ch.length && !(ch[p] > c && Math.abs(ch[p] - c) > w)) p++;
  return p;
}

/** trimmedMean of the first `n` values of an ascending array: the same sum in the same order. */
function trimmedMeanOfSorted(s: Float64Array, n: number): number {
  const k = Math.floor(n * 0.1);
  let sum = 0;
  for (let i = k; i < n - k; i++) sum += s[i];
  return sum / (n - 2 * k);
}

/** The element `median` picks (the ⌈n/2⌉-th smallest) of the first `n` values of an ascending array. */
function medianOfSorted(s: Float64Array, n: number): number {
  return n === 0 ? 0 : s[Math.min(n - 1, Math.max(0, Math.ceil(0.5 * n) - 1))];
}

/**
 * median of `n` values in `xs` (reordered in place), the element `median` picks, by quickselect (Hoare 1961):
 * linear in n where sorting the ±32 m ring of a much-walked route is not.
 */
function medianInPlace(xs: Float64Array, n: number): number {
  if (n === 0) return 0;
  const k = Math.min(n - 1, Math.max(0, Math.ceil(0.5 * n) - 1));
  let lo = 0;
  let hi = n - 1;
  while (hi > lo) {
    const pivot = xs[(lo + hi) >> 1];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (xs[i] < pivot) i++;
      while (xs[j] > pivot) j--;
      if (i <= j) {
        const t = xs[i];
        (xs[i++] = xs[j]), (xs[j--] = t);
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return xs[k];
  }
  return xs[k];
}

// the columns of one route's smoothing at a time (smoothBins runs route by route, start to end without a pause)
const routeScratch = new Scratch();

function smoothBins(route: LonLat[], length: number, sources: RouteObservations[], o: Required<SectionOptions>): Bin[] {
  const nb = Math.max(1, Math.ceil(length));
  routeScratch.reset();
  // per source: where it saw the trench, its fixes by chainage as columns, and, made when first used, its
  // window, its ring and the ring's time span, slid metre by metre, and the six window bounds it last found
  // (inner, outer ring and inner ring: start and end each). Arrays pushed to, not made by `map`: the kind of
  // array `map` makes depends on whether V8 runs it optimised, and code optimised for one is thrown back by the other
  const covered: [number, number][][] = [];
  const columns: SortedFixes[] = [];
  const slides: (null | { inner: SortedWindow; ring: SortedWindow; times: WindowExtremes; at: Int32Array })[] = [];
  let most = 1;
  for (const s of sources) {
    covered.push(seen(s, o));
    columns.push(sortedColumns(s.fixes, routeScratch));
    slides.push(null);
    most = Math.max(most, s.fixes.length);
  }
  const scratch = routeScratch.f64(most);
  const bins: Bin[] = [];
  for (let i = 0; i < nb; i++) {
    const c = Math.min(length, i + 0.5);
    // the most accurate source that saw this metre wins; the others are not counted again
    let best = -1;
    for (let k = 0; k < sources.length; k++) {
      const spans = covered[k];
      let inside = false;
      for (let q = 0; !inside && q < spans.length; q++) inside = c >= spans[q][0] - 0.5 && c <= spans[q][1] + 0.5;
      if (!inside) continue;
      if (best < 0 || sources[k].sigmaM < sources[best].sigmaM) best = k;
    }
    if (best < 0) {
      bins.push({ source: -1, anomaly: 0, baseline: 0, se: 0, residualBias: 0, deviates: false });
      continue;
    }
    const s = sources[best];
    const { chainage, offset, t } = columns[best];
    const slide = (slides[best] ??= { inner: new SortedWindow(offset, routeScratch), ring: new SortedWindow(offset, routeScratch), times: new WindowExtremes(t, routeScratch), at: new Int32Array(6) });
    const at = slide.at;
    const w = s.surveyGrade ? Math.max(1, o.windowM / 10) : o.windowM;
    const n0 = (at[0] = windowStart(chainage, c, w, at[0]));
    const n1 = (at[1] = windowEnd(chainage, c, w, at[1]));
    let count = n1 - n0;
    let centre: number;
    if (count > 0) {
      slide.inner.moveTo(n0, n1, n1, n1);
      centre = trimmedMeanOfSorted(slide.inner.sorted, count);
    } else {
      // a stretch the walk is known to have crossed without a fix on it (a short road crossing): on the plan;
      // else the nearest fix
      let near = 0;
      for (let q = 1; q < chainage.length; q++) if (Math.abs(chainage[q] - c) < Math.abs(chainage[near] - c)) near = q;
      centre = chainage.length === 0 ? 0 : offset[near];
      count = 1;
    }
    let anomaly = centre;
    let baseline = 0;
    let residualBias = 0;
    let se = (TRIM_EFFICIENCY * s.sigmaM) / Math.sqrt(count);
    if (!s.surveyGrade) {
      // the GNSS bias drifts over a minute or so: measure the offset against its wider neighbourhood,
      // and allow for how far the bias can wander within that neighbourhood's time span
      // the ring around the window, not the window itself, so that a detour does not pull its own baseline
      const w0 = (at[2] = windowStart(chainage, c, 4 * o.windowM, at[2]));
      const w1 = (at[3] = windowEnd(chainage, c, 4 * o.windowM, at[3]));
      const r0 = (at[4] = windowStart(chainage, c, 2 * o.windowM, at[4]));
      const r1 = (at[5] = windowEnd(chainage, c, 2 * o.windowM, at[5]));
      const ringSize = r0 - w0 + (w1 - r1);
      let basisSize: number;
      slide.ring.moveTo(w0, r0, r1, w1);
      if (ringSize >= 5) {
        baseline = medianOfSorted(slide.ring.sorted, ringSize);
        basisSize = ringSize;
      } else {
        scratch.set(offset.subarray(w0, w1));
        basisSize = w1 - w0;
        baseline = medianInPlace(scratch, basisSize);
      }
      anomaly = centre - baseline;
      slide.times.moveTo(w0, w1);
      const span = slide.times.count > 1 ? slide.times.max() - slide.times.min() : 8 * w;
      // over a span T much shorter than τ the bias moves like a random walk with diffusion 2σ²/τ, so its
      // distance from its own average over the span has variance σ²·T/(3τ); beyond that it is plain σ²
      const drift = o.biasSigmaM * Math.sqrt(Math.min(1, span / (3 * o.biasTauS)));
      // the baseline is itself a median of noisy fixes: its error does not shrink with the window's fixes
      const baselineSe = (MEDIAN_EFFICIENCY * s.sigmaM) / Math.sqrt(basisSize);
      residualBias = Math.hypot(drift, baselineSe);
      se = Math.sqrt(se * se + residualBias * residualBias);
    }
    const deviates = Math.abs(anomaly) > o.toleranceM && Math.abs(anomaly) - o.toleranceM > Z95 * se;
    bins.push({ source: best, anomaly, baseline, se, residualBias, deviates });
  }
  // Each candidate run is tested once more as a whole, at a stricter level: a route has many metres, and
  // a per-metre test alone would flag chance runs of noise. A real detour has many fixes and passes.
  for (let i = 0; i < bins.length; ) {
    let j = i;
    while (j < bins.length && bins[j].deviates === bins[i].deviates && bins[j].source === bins[i].source) j++;
    if (bins[i].deviates) {
      const s = sources[bins[i].source];
      const { chainage, offset } = columns[bins[i].source];
      const anomalies: number[] = [];
      for (let q = 0; q < chainage.length; q++) {
        if (chainage[q] >= i && chainage[q] <= j) anomalies.push(offset[q] - bins[Math.min(bins.length - 1, Math.max(0, Math.floor(chainage[q])))].baseline);
      }
      const m = anomalies.length ? trimmedMean(anomalies) : 0;
      const rb = Math.max(...bins.slice(i, j).map((b) => b.residualBias));
      const seRun = Math.sqrt(((TRIM_EFFICIENCY * s.sigmaM) ** 2) / Math.max(1, anomalies.length) + rb * rb);
      const real = j - i >= o.minRunM && Math.abs(m) - o.toleranceM > Z_RUN * seRun;
      if (!real) for (let k = i; k < j; k++) bins[k].deviates = false;
    }
    i = j;
  }
  return bins;
}

/** The builder's settings where the caller gives none (bias and its correlation time after the matcher's scenarios). */
export const SECTION_DEFAULTS: Required<Omit<SectionOptions, 'toleranceM'>> = { biasSigmaM: 1, biasTauS: 60, bridgeM: 60, windowM: 8, minRunM: 6, breaksM: [] };

/** The measured offset at a chainage, interpolated between the survey points about it (held at the ends). */
function offsetAt(sorted: RouteObservations['fixes'], c: number): { chainageM: number; offsetM: number } {
  const j = sorted.findIndex((f) => f.chainageM >= c);
  if (j <= 0) return { chainageM: c, offsetM: sorted[j === 0 ? 0 : sorted.length - 1].offsetM };
  const [a, b] = [sorted[j - 1], sorted[j]];
  const t = b.chainageM > a.chainageM ? (c - a.chainageM) / (b.chainageM - a.chainageM) : 0;
  return { chainageM: c, offsetM: a.offsetM + t * (b.offsetM - a.offsetM) };
}

/**
 * The as-built sections of one planned route from every upload matched onto it: built intervals by
 * chainage; `as_planned` where the observations agree with the plan within their noise (the line is the
 * planned line), `deviates` where they depart consistently beyond the tolerance (the line follows the
 * smoothed observations), survey-grade sources' measured line where they are the best source, and
 * `not_built` where nothing was observed.
 *
 * buildRouteSections({ ref: 'R-1', coords }, [{ uploadId, sigmaM: 4, surveyGrade: false, laidOn, fixes }], { toleranceM: 0.5 })
 */
export function buildRouteSections(route: { ref: string; coords: LonLat[] }, sources: RouteObservations[], opts: SectionOptions): SectionDraft[] {
  const o: Required<SectionOptions> = { ...SECTION_DEFAULTS, ...opts };
  const length = lineLengthM(route.coords);
  const bins = smoothBins(route.coords, length, sources, o);
  // a split falls on the metre boundary nearest its chainage: sections are built from 1 m bins
  const breaks = new Set(o.breaksM.map((b) => Math.round(b)).filter((b) => b > 0 && b < bins.length));
  const drafts: SectionDraft[] = [];
  for (let i = 0; i < bins.length; ) {
    let j = i;
    while (j < bins.length && bins[j].source === bins[i].source && bins[j].deviates === bins[i].deviates && (j === i || !breaks.has(j))) j++;
    const from = i;
    const to = Math.min(length, j);
    const run = bins.slice(i, j);
    const src = run[0].source >= 0 ? sources[run[0].source] : null;
    const status: SectionStatus = !src ? 'not_built' : run[0].deviates ? 'deviates' : 'as_planned';
    let coords: LonLat[];
    let offsets: number[];
    let accuracyM: number;
    if (!src) {
      coords = subLine(route.coords, from, to);
      offsets = [];
      accuracyM = 0;
    } else if (src.surveyGrade) {
      const all = [...src.fixes].sort((a, b) => a.chainageM - b.chainageM);
      const pts = all.filter((f) => f.chainageM > from && f.chainageM < to);
      // the measured line runs from boundary to boundary: its ends are interpolated between the points on
      // either side, so neighbouring sections meet and no length is lost between them
      const ends = [offsetAt(all, from), offsetAt(all, to)];
      coords = all.length >= 2 ? [ends[0], ...pts, ends[1]].map((f) => offsetPoint(route.coords, f.chainageM, f.offsetM)) : subLine(route.coords, from, to);
      offsets = [...pts, ...ends].map((f) => Math.abs(f.offsetM));
      accuracyM = R95_FACTOR * src.sigmaM;
    } else if (status === 'deviates') {
      coords = run.map((b, k) => offsetPoint(route.coords, Math.min(length, from + k + 0.5), b.anomaly));
      coords.unshift(offsetPoint(route.coords, from, run[0].anomaly));
      coords.push(offsetPoint(route.coords, to, run[run.length - 1].anomaly));
      offsets = run.map((b) => Math.abs(b.anomaly));
      accuracyM = R95_FACTOR * median(run.map((b) => b.se));
    } else {
      coords = subLine(route.coords, from, to);
      offsets = run.map((b) => Math.abs(b.anomaly));
      accuracyM = R95_FACTOR * median(run.map((b) => b.se));
    }
    const contributing = src ? sources.filter((s) => seen(s, o).some(([a, b]) => a < to && b > from)) : [];
    drafts.push({
      ref: route.ref,
      fromChainageM: from,
      toChainageM: to,
      status,
      coords,
      lengthM: pathLengthM(coords),
      maxOffsetM: offsets.length ? Math.max(...offsets) : 0,
      p95OffsetM: quantile(offsets, 0.95),
      accuracyM,
      sourceUploadIds: [...new Set(contributing.map((s) => s.uploadId))].sort(),
      laidOn: src?.laidOn ?? null,
    });
    i = j;
  }
  return drafts;
}
