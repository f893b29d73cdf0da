import { lineLengthM } from './chainage';
import { signedOffset } from './offset-profile';
import { subLine } from './build-sections';
import type { SectionDraft } from './section-types';
import type { LonLat, PlannedRouteInput } from './types';
import { R95_FACTOR } from '../records/accuracy-classes';

/** boundaries this close (m) are the same boundary: chainages are stored to the millimetre but drawn to the metre */
const SAME_PLACE_M = 0.5;

/**
 * An engineer's correction as the reconciliation applies it, again on every run. Stretches are named by
 * route reference and chainage, never by section id, so a correction outlives re-runs and revisions.
 * (Promoting an unplanned stretch changes the plan itself and is not applied here.)
 */
export type Correction =
  | { id: number; kind: 'split'; ref: string; atM: number }
  | { id: number; kind: 'merge'; ref: string; atM: number }
  | { id: number; kind: 'reassign'; ref: string; fromM: number; toM: number; targetRef: string }
  | { id: number; kind: 'mark_built'; ref: string; fromM: number; toM: number; sourceUploadId: string | null; sigmaM: number; laidOn: string | null; reason: string }
  | { id: number; kind: 'not_built_reason'; ref: string; fromM: number; toM: number; reason: string };

/** Chainages where the builder must start a new section on a route (split corrections). */
export function splitPoints(corrections: Correction[], ref: string): number[] {
  return corrections.filter((c) => c.kind === 'split' && c.ref === ref).map((c) => (c as { atM: number }).atM).sort((a, b) => a - b);
}

/**
 * Moves matched fixes the engineer says belong to another route (a reassign correction): each fix on
 * `ref` within the chainage range is projected onto the target route instead. Fixes of other stretches are
 * returned unchanged, in order.
 *
 * reassignFixes([{ seq: 4, ref: 'QN-101', chainageM: 12, … }], positions, routesByRef, [{ kind: 'reassign', ref: 'QN-101', fromM: 0, toM: 20, targetRef: 'QN-X2', … }])
 */
export function reassignFixes<T extends { seq: number; ref: string; chainageM: number; offsetM: number; distanceM: number }>(
  matched: T[],
  position: (seq: number) => LonLat,
  routes: Map<string, PlannedRouteInput>,
  corrections: Correction[],
): { fixes: T[]; moved: number } {
  const rules = corrections.filter((c): c is Extract<Correction, { kind: 'reassign' }> => c.kind === 'reassign' && routes.has(c.targetRef));
  if (rules.length === 0) return { fixes: matched, moved: 0 };
  let moved = 0;
  const fixes = matched.map((m) => {
    const rule = rules.find((r) => r.ref === m.ref && m.chainageM >= r.fromM && m.chainageM <= r.toM);
    if (!rule) return m;
    moved++;
    return { ...m, ref: rule.targetRef, ...signedOffset(routes.get(rule.targetRef)!.coords, position(m.seq)) };
  });
  return { fixes, moved };
}

const overlaps = (d: SectionDraft, from: number, to: number) => Math.min(d.toChainageM, to) - Math.max(d.fromChainageM, from) > 1e-6;
const withCorrection = (ids: number[] | undefined, id: number) => [...new Set([...(ids ?? []), id])].sort((a, b) => a - b);

/** The not-built part of a draft inside [from, to] becomes built on the named other source; the rest stays as it was. */
function markBuilt(d: SectionDraft, route: PlannedRouteInput, c: Extract<Correction, { kind: 'mark_built' }>): SectionDraft[] {
  if (d.status !== 'not_built' || !overlaps(d, c.fromM, c.toM)) return [d];
  const a = Math.max(d.fromChainageM, c.fromM);
  const b = Math.min(d.toChainageM, c.toM);
  const part = (from: number, to: number): SectionDraft => {
    const coords = subLine(route.coords, from, to);
    return { ...d, fromChainageM: from, toChainageM: to, coords, lengthM: lineLengthM(coords) };
  };
  const out: SectionDraft[] = [];
  if (a - d.fromChainageM > 1e-6) out.push(part(d.fromChainageM, a));
  const built = part(a, b);
  out.push({
    ...built, status: 'as_planned', maxOffsetM: 0, p95OffsetM: 0, offsetsUnmeasured: true, accuracyM: R95_FACTOR * c.sigmaM,
    sourceUploadIds: c.sourceUploadId ? [c.sourceUploadId] : [], laidOn: c.laidOn, note: `Counted built on another source: ${c.reason}`, correctionIds: withCorrection(d.correctionIds, c.id),
  });
  if (d.toChainageM - b > 1e-6) out.push(part(b, d.toChainageM));
  return out;
}

/** Two neighbouring built stretches as one: the worse status, the looser figures, both sources. */
function mergePair(a: SectionDraft, b: SectionDraft, id: number): SectionDraft {
  const coords = [...a.coords, ...b.coords.slice(1)];
  const notes = [a.note, b.note].filter(Boolean);
  return {
    ref: a.ref,
    fromChainageM: a.fromChainageM,
    toChainageM: b.toChainageM,
    status: a.status === 'deviates' || b.status === 'deviates' ? 'deviates' : 'as_planned',
    coords,
    lengthM: lineLengthM(coords),
    // a stretch counted built on another source has no offsets of its own: the measured side's stand
    maxOffsetM: a.offsetsUnmeasured ? b.maxOffsetM : b.offsetsUnmeasured ? a.maxOffsetM : Math.max(a.maxOffsetM, b.maxOffsetM),
    // the p95 of the union is at most the larger of the two: a conservative figure without the fixes
    p95OffsetM: a.offsetsUnmeasured ? b.p95OffsetM : b.offsetsUnmeasured ? a.p95OffsetM : Math.max(a.p95OffsetM, b.p95OffsetM),
    ...(a.offsetsUnmeasured && b.offsetsUnmeasured ? { offsetsUnmeasured: true } : {}),
    accuracyM: Math.max(a.accuracyM, b.accuracyM),
    sourceUploadIds: [...new Set([...a.sourceUploadIds, ...b.sourceUploadIds])].sort(),
    laidOn: [a.laidOn, b.laidOn].filter((x): x is string => !!x).sort().pop() ?? null,
    note: notes.length ? notes.join(' ') : null,
    correctionIds: withCorrection([...(a.correctionIds ?? []), ...(b.correctionIds ?? [])], id),
  };
}

/**
 * Applies the engineer's corrections to the sections the builder made for one route, in the order they
 * were made: stretches counted built on another source, merges of neighbouring built sections at a
 * boundary, and reasons given for what is not built. Splits are applied by the builder itself
 * (`splitPoints`), reassignments to the matched fixes (`reassignFixes`). A correction that no longer finds
 * its stretch (a merge at a boundary that has gone) changes nothing.
 *
 * applyRouteCorrections(route, buildRouteSections(route, sources, { toleranceM, breaksM: splitPoints(cs, route.ref) }), cs)
 */
export function applyRouteCorrections(route: PlannedRouteInput, drafts: SectionDraft[], corrections: Correction[]): SectionDraft[] {
  let out = [...drafts].sort((a, b) => a.fromChainageM - b.fromChainageM);
  const mine = corrections.filter((c) => c.ref === route.ref).sort((a, b) => a.id - b.id);
  for (const c of mine) {
    if (c.kind === 'split') {
      out = out.map((d) => (Math.abs(d.fromChainageM - c.atM) < SAME_PLACE_M || Math.abs(d.toChainageM - c.atM) < SAME_PLACE_M ? { ...d, correctionIds: withCorrection(d.correctionIds, c.id) } : d));
    } else if (c.kind === 'mark_built') {
      out = out.flatMap((d) => markBuilt(d, route, c));
    } else if (c.kind === 'merge') {
      const i = out.findIndex((d, k) => k + 1 < out.length && Math.abs(d.toChainageM - c.atM) < SAME_PLACE_M && Math.abs(out[k + 1].fromChainageM - c.atM) < SAME_PLACE_M);
      if (i >= 0 && out[i].status !== 'not_built' && out[i + 1].status !== 'not_built') out.splice(i, 2, mergePair(out[i], out[i + 1], c.id));
    } else if (c.kind === 'not_built_reason') {
      out = out.map((d) => (d.status === 'not_built' && overlaps(d, c.fromM, c.toM) ? { ...d, note: c.reason, correctionIds: withCorrection(d.correctionIds, c.id) } : d));
    } else if (c.kind === 'reassign') {
      // the fixes were moved before building: mark what is left on the old stretch, and what the target gained
      out = out.map((d) => (overlaps(d, c.fromM, c.toM) ? { ...d, correctionIds: withCorrection(d.correctionIds, c.id) } : d));
    }
  }
  return out;
}
