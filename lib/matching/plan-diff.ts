import { localFrame, type XY } from './chainage';
import { coverage } from './coverage';
import type { LonLat, PlanChange, PlannedRouteInput } from './types';

/** below this a move is coordinate rounding (1e-8° ≈ 1 mm), not an edit */
const REAL_CHANGE_M = 0.001;

function reshaped(a: LonLat[], b: LonLat[], thresholdM: number): boolean {
  if (a.length === 0 || b.length === 0) return a.length !== b.length;
  const f = localFrame(a[0]);
  const [pa, pb] = [a.map(f.toXY), b.map(f.toXY)];
  // a single position is a zero-length segment, so coverage still measures it
  const [la, lb] = [pa.length === 1 ? [pa[0], pa[0]] : pa, pb.length === 1 ? [pb[0], pb[0]] : pb];
  const apart = (p: XY, q: XY) => Math.hypot(p[0] - q[0], p[1] - q[1]) > thresholdM;
  // the ends are compared in order so that a reversed line, whose chainage flips, counts as reshaped
  if (apart(pa[0], pb[0]) || apart(pa[pa.length - 1], pb[pb.length - 1])) return true;
  return !coverage(la, lb, thresholdM).full || !coverage(lb, la, thresholdM).full;
}

const firstByRef = (routes: PlannedRouteInput[]) => {
  const out = new Map<string, PlannedRouteInput>();
  for (const r of routes) if (!out.has(r.ref)) out.set(r.ref, r);
  return out;
};

/**
 * What changed between two revisions of a plan, by ref. Reshaped: the lines lie more than `reshapeM` apart
 * somewhere (directed Hausdorff either way, exact for polylines, in a local frame about the old line's
 * start), an end moved by more than that (so a reversal counts), or the vertex count changed together with
 * a real move (> 1 mm). Retagged: same shape, other street, ducts or kind. A repeated ref counts once, its
 * first occurrence (buildRouteGraph reports the repeat). Arrays are sorted by code unit.
 * `diffPlans([a], [{ ...a, street: 'Elm St' }]).retagged` → `[a.ref]`
 */
export function diffPlans(previous: PlannedRouteInput[], next: PlannedRouteInput[], opts: { reshapeM?: number } = {}): PlanChange {
  const reshapeM = opts.reshapeM ?? 0.05;
  const [before, after] = [firstByRef(previous), firstByRef(next)];
  const out: PlanChange = { added: [], removed: [], reshaped: [], unchanged: [], retagged: [] };
  for (const ref of after.keys()) if (!before.has(ref)) out.added.push(ref);
  for (const [ref, old] of before) {
    const now = after.get(ref);
    if (!now) {
      out.removed.push(ref);
      continue;
    }
    const threshold = old.coords.length === now.coords.length ? reshapeM : Math.min(reshapeM, REAL_CHANGE_M);
    if (reshaped(old.coords, now.coords, threshold)) out.reshaped.push(ref);
    else if (old.street !== now.street || old.ducts !== now.ducts || old.kind !== now.kind) out.retagged.push(ref);
    else out.unchanged.push(ref);
  }
  for (const list of Object.values(out)) list.sort();
  return out;
}
