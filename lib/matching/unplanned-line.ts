import simplify from 'simplify-js';
import { localFrame } from './chainage';
import type { LonLat } from './types';

/** Local linear fit of x over positions lo…hi (inclusive), evaluated at i: unbiased at a run's ends, unlike a moving average. */
export function localLinear(xs: number[], i: number, lo: number, hi: number): number {
  return localLinearFrom(xs, 0, i, lo, hi);
}

/** localLinear over the values xs[base …] (a stretch of a longer column): the same arithmetic, no copy. */
export function localLinearFrom(xs: ArrayLike<number>, base: number, i: number, lo: number, hi: number): number {
  const n = hi - lo + 1;
  if (n < 3) {
    let sum = 0;
    for (let k = lo; k <= hi; k++) sum += xs[base + k];
    return sum / n;
  }
  let st = 0;
  let sx = 0;
  let stt = 0;
  let stx = 0;
  for (let k = lo; k <= hi; k++) (st += k), (sx += xs[base + k]), (stt += k * k), (stx += k * xs[base + k]);
  const slope = (n * stx - st * sx) / (n * stt - st * st);
  return (sx - slope * st) / n + slope * i;
}

/**
 * The line of an unplanned stretch from the fixes of one unmatched run: a walk out along a trench and back
 * is folded to its outward leg (the trench is one line, walked twice); positions are smoothed by a local
 * linear fit over ±k fixes; then the line is simplified to within `simplifyM` (Douglas–Peucker, simplify-js),
 * since the zigzag a smoothed noisy walk keeps would make it far longer than the trench. Survey-grade runs
 * (k = 0) keep their measured points.
 *
 * unplannedLine(run.map((f) => [f.lon, f.lat]), { k: 3, simplifyM: 2 })
 */
export function unplannedLine(points: LonLat[], opts: { k: number; simplifyM: number }): LonLat[] {
  if (opts.k === 0 || points.length < 3) return points;
  const f = localFrame(points[0]);
  const xy = points.map((p) => f.toXY(p));
  // the farthest point from the start: when the walk comes back most of the way, keep the outward leg
  const far = xy.reduce((best, p, i) => (Math.hypot(p[0], p[1]) > Math.hypot(xy[best][0], xy[best][1]) ? i : best), 0);
  const reach = Math.hypot(xy[far][0], xy[far][1]);
  const last = xy[xy.length - 1];
  const leg = far > 1 && Math.hypot(last[0], last[1]) < 0.5 * reach ? xy.slice(0, far + 1) : xy;
  const xs = leg.map((p) => p[0]);
  const ys = leg.map((p) => p[1]);
  const smoothed = leg.map((_, i) => {
    const lo = Math.max(0, i - opts.k);
    const hi = Math.min(leg.length - 1, i + opts.k);
    return { x: localLinear(xs, i, lo, hi), y: localLinear(ys, i, lo, hi) };
  });
  return simplify(smoothed, opts.simplifyM, true).map((p) => f.toLonLat([p.x, p.y]));
}
