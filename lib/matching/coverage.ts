import type { XY } from './chainage';

// gaps shorter than this are rounding, not an uncovered stretch
const GAP_M = 1e-9;

/** The stretch of line `a` lying within `r` of line `b`, both in one metric frame. */
export interface Coverage {
  /** planar metres of `a` within r of `b` */
  coveredM: number;
  /** planar chainage on `a` of the first and last covered point (NaN when nothing is covered) */
  firstM: number;
  lastM: number;
  /** every point of `a` is within r of `b`: the directed Hausdorff distance a → b is ≤ r */
  full: boolean;
}

/** Parameter range on p0→p1 inside the capsule of radius r about q0→q1: convex, so the hull of its pieces. */
function capsuleRange(p0: XY, p1: XY, q0: XY, q1: XY, r: number): [number, number] | null {
  const dx = p1[0] - p0[0];
  const dy = p1[1] - p0[1];
  let lo = Infinity;
  let hi = -Infinity;
  const take = (a: number, b: number) => {
    if (a <= b) [lo, hi] = [Math.min(lo, a), Math.max(hi, b)];
  };
  const dd = dx * dx + dy * dy;
  for (const c of [q0, q1]) {
    const ox = p0[0] - c[0];
    const oy = p0[1] - c[1];
    const k = ox * ox + oy * oy - r * r;
    if (dd === 0) {
      if (k <= 0) take(0, 1);
      continue;
    }
    const b = dx * ox + dy * oy;
    const disc = b * b - dd * k;
    if (disc >= 0) take((-b - Math.sqrt(disc)) / dd, (-b + Math.sqrt(disc)) / dd);
  }
  const len = Math.hypot(q1[0] - q0[0], q1[1] - q0[1]);
  if (len > 0) {
    const ux = (q1[0] - q0[0]) / len;
    const uy = (q1[1] - q0[1]) / len;
    let t0 = -Infinity;
    let t1 = Infinity;
    // Liang–Barsky clip against 0 ≤ along ≤ len and |across| ≤ r
    const clip = (v0: number, vd: number, min: number, max: number) => {
      if (vd === 0) {
        if (v0 < min || v0 > max) t0 = Infinity;
        return;
      }
      const a = (min - v0) / vd;
      const b = (max - v0) / vd;
      t0 = Math.max(t0, Math.min(a, b));
      t1 = Math.min(t1, Math.max(a, b));
    };
    const ox = p0[0] - q0[0];
    const oy = p0[1] - q0[1];
    clip(ox * ux + oy * uy, dx * ux + dy * uy, 0, len);
    clip(-ox * uy + oy * ux, -dx * uy + dy * ux, -r, r);
    if (dd === 0 && t0 <= t1) take(0, 1);
    else take(t0, t1);
  }
  lo = Math.max(lo, 0);
  hi = Math.min(hi, 1);
  return lo <= hi ? [lo, hi] : null;
}

/**
 * How much of `a` lies within `r` of `b`: exact for polylines (each segment is clipped against the
 * capsules of b's segments), so "fully covered" is the same as a directed Hausdorff distance ≤ r.
 * The plan diff is built on it; buildRouteGraph reuses it for duplicates and overlaps.
 * `coverage([[0, 0], [10, 0]], [[5, 0.2], [20, 0.2]], 0.5)` → `{ coveredM: 5.46, firstM: 4.54, lastM: 10, full: false }`
 */
export function coverage(a: XY[], b: XY[], r: number): Coverage {
  let full = true;
  let coveredM = 0;
  let firstM = NaN;
  let lastM = NaN;
  let base = 0;
  for (let i = 0; i + 1 < a.length; i++) {
    const p0 = a[i];
    const p1 = a[i + 1];
    const segLen = Math.hypot(p1[0] - p0[0], p1[1] - p0[1]);
    const ranges: [number, number][] = [];
    for (let j = 0; j + 1 < b.length; j++) {
      const q0 = b[j];
      const q1 = b[j + 1];
      if (Math.max(q0[0], q1[0]) + r < Math.min(p0[0], p1[0]) || Math.min(q0[0], q1[0]) - r > Math.max(p0[0], p1[0])) continue;
      if (Math.max(q0[1], q1[1]) + r < Math.min(p0[1], p1[1]) || Math.min(q0[1], q1[1]) - r > Math.max(p0[1], p1[1])) continue;
      const range = capsuleRange(p0, p1, q0, q1, r);
      if (range) ranges.push(range);
    }
    ranges.sort((x, y) => x[0] - y[0]);
    let end = 0;
    full &&= ranges.length > 0;
    for (const [s, e] of ranges) {
      const from = Math.max(s, end);
      if ((from - end) * segLen > GAP_M) full = false;
      if (e > from) coveredM += (e - from) * segLen;
      end = Math.max(end, e);
    }
    if ((1 - end) * segLen > GAP_M) full = false;
    if (ranges.length > 0) {
      if (Number.isNaN(firstM)) firstM = base + ranges[0][0] * segLen;
      lastM = base + end * segLen;
    }
    base += segLen;
  }
  return { coveredM, firstM, lastM, full };
}
