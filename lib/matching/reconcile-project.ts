import { buildRouteSections, SECTION_DEFAULTS } from './build-sections';
import { applyRouteCorrections, reassignFixes, splitPoints, type Correction } from './corrections';
import { unplannedLine } from './unplanned-line';
import { claimBeyondEnds, foldJunctionHops, walkedIntervals } from './visits';
import { distanceM, lineLengthM } from './chainage';
import { matchTrace, prepareMatchNetwork } from './match-trace';
import { projectOntoRoute } from './candidates';
import type { Fix, MatchedFix } from './match-types';
import { buildRouteGraph } from './route-graph';
import type { RouteObservations, SectionDraft } from './section-types';
import type { LonLat, PlannedRouteInput } from './types';
import { R95_FACTOR } from '../records/accuracy-classes';

/** Matching is CPU work; between traces it lets the process serve other requests (the web server runs jobs too). */
const breathe = () => new Promise<void>((resolve) => setImmediate(resolve));

/**
 * The fix with a given seq, for a trace's matched fixes: a table by seq where seqs are whole numbers in a
 * compact range (as the stored points' are), else a Map. Throws on a seq the trace does not hold.
 */
export function seqLookup(trace: Fix[]): (seq: number) => Fix {
  let [lo, hi] = [Infinity, -Infinity];
  let whole = true;
  for (const f of trace) {
    if (!Number.isInteger(f.seq)) whole = false;
    if (f.seq < lo) lo = f.seq;
    if (f.seq > hi) hi = f.seq;
  }
  const missing = (seq: number): never => {
    throw new RangeError(`no fix with seq ${seq} in this trace`);
  };
  if (whole && trace.length > 0 && hi - lo < 4 * trace.length + 1024) {
    const at = new Int32Array(hi - lo + 1).fill(-1);
    trace.forEach((f, i) => (at[f.seq - lo] = i));
    return (seq) => {
      const i = seq >= lo && seq <= hi ? at[seq - lo] : -1;
      return i >= 0 ? trace[i] : missing(seq);
    };
  }
  const bySeq = new Map<number, Fix>();
  for (const f of trace) bySeq.set(f.seq, f);
  return (seq) => bySeq.get(seq) ?? missing(seq);
}

/** One upload as the matcher takes it: its lines and point runs as traces, with its accuracy. */
export interface UploadTraces {
  uploadId: string;
  sigmaM: number;
  surveyGrade: boolean;
  laidOn: string | null;
  traces: Fix[][];
}

export interface ReconcileStats {
  fixes: number;
  matched: number;
  outliers: number;
  unplannedRuns: number;
  pieces: number;
  /** matched fixes moved to another route by the engineer's reassign corrections */
  reassigned: number;
  /** handheld fixes put back on their route after a hop onto a joining route within their noise */
  junctionHops: number;
  /**
   * wall time of each stage, when asked for with `timings: true` (bench:match): the graph and index build,
   * matchTrace, the passes over the matched fixes (junction hops, route ends, walked intervals, unplanned
   * lines) and the section building
   */
  timingsMs?: { prepareMs: number; matchMs: number; visitsMs: number; sectionsMs: number };
}

/** The matched observations of one upload on one route, for the offset-versus-chainage plot. */
export interface RouteObservationSeries {
  ref: string;
  uploadId: string;
  chainageM: number[];
  offsetM: number[];
  /** each observation's time (epoch seconds), null where the fix had none */
  timeS: (number | null)[];
}

/**
 * The whole reconciliation of a project, as plain data: every upload's traces matched onto the planned
 * network (hidden Markov model), then the sections of each route from all uploads together, plus the
 * stretches that fit no route as unplanned sections. Deterministic: the same input gives the same drafts.
 *
 * const { drafts } = await reconcileProject(routes, uploads, { toleranceM: 0.5 })
 */
export async function reconcileProject(
  routes: PlannedRouteInput[],
  uploads: UploadTraces[],
  opts: { toleranceM: number; corrections?: Correction[]; timings?: boolean; onProgress?: (fraction: number) => void },
): Promise<{ drafts: SectionDraft[]; stats: ReconcileStats; observations: RouteObservationSeries[] }> {
  const tPrepare = performance.now();
  // the plan's import reported its duplicates and overlaps: the graph alone is needed here
  const graph = buildRouteGraph(routes, { pairChecks: false });
  const prepared = prepareMatchNetwork(routes, graph);
  const routeIndex = new Map<string, number>();
  routes.forEach((r, i) => routeIndex.has(r.ref) || routeIndex.set(r.ref, i));
  const corrections = opts.corrections ?? [];
  const routeByRef = new Map(routes.map((r) => [r.ref, r]));
  const lengths = new Map(routes.map((r) => [r.ref, lineLengthM(r.coords)]));
  const byRoute = new Map<string, RouteObservations[]>();
  const drafts: SectionDraft[] = [];
  const stats: ReconcileStats = { fixes: 0, matched: 0, outliers: 0, unplannedRuns: 0, pieces: 0, reassigned: 0, junctionHops: 0 };
  // timings stay out of the stored run summary unless asked for: they differ from run to run
  const timingsMs = { prepareMs: performance.now() - tPrepare, matchMs: 0, visitsMs: 0, sectionsMs: 0 };
  const sorted = [...uploads].sort((a, b) => a.uploadId.localeCompare(b.uploadId));
  for (const [u, up] of sorted.entries()) {
    for (const trace of up.traces) {
      if (trace.length < 2) continue;
      await breathe();
      // the matcher compares fixes with the PLAN, which the trench may leave by up to a few metres:
      // its noise term covers the source's own error and that expected departure
      const sigmaM = Math.hypot(up.sigmaM, Math.max(opts.toleranceM, 1));
      const t0 = performance.now();
      const result = matchTrace(trace, routes, graph, { sigmaM }, prepared);
      const t1 = performance.now();
      timingsMs.matchMs += t1 - t0;
      stats.fixes += trace.length;
      stats.matched += result.matched.length;
      stats.outliers += result.outliers.length;
      stats.pieces += result.pieces;
      const fixOf = seqLookup(trace);
      const position = (seq: number): LonLat => [fixOf(seq).lon, fixOf(seq).lat];
      // a fix put on a route the matcher did not choose: with the candidate search's own arithmetic
      const onRoute = (m: { seq: number }, ref: string) => {
        const k = routeIndex.get(ref);
        return k === undefined ? null : projectOntoRoute(prepared.index, k, fixOf(m.seq));
      };
      const { fixes: reassigned, moved } = reassignFixes(result.matched, position, routeByRef, corrections);
      stats.reassigned += moved;
      // a handheld walk past a junction hops onto the other route and back within its noise: put it back
      const hops = up.surveyGrade ? { fixes: reassigned, folded: 0 } : foldJunctionHops(reassigned, onRoute, { radiusM: 2.5 * up.sigmaM, maxFixes: 10 });
      stats.junctionHops += hops.folded;
      const ends = claimBeyondEnds(hops.fixes, result.unmatched, fixOf, routeByRef, { nearM: 2 * up.sigmaM });
      const matched = ends.matched;
      const perRef = fixesByRoute(matched);
      // where a walk saw trench: per visit, from its smoothed chainages (survey points are taken as they are)
      const offNetwork = new Set(ends.unmatched.flatMap((r) => r.fixes.map((f) => f.seq)));
      const walked = up.surveyGrade ? null : walkedIntervals(matched, graph, { k: 5, bridgeM: SECTION_DEFAULTS.bridgeM, minFixes: 3, nearM: 2 * up.sigmaM, lengths, offNetwork });
      // a route the walk crossed without a fix matched on it (a short road crossing) is still seen built
      if (walked) for (const ref of walked.keys()) if (!perRef.has(ref) && walked.get(ref)!.length > 0) perRef.set(ref, []);
      for (const [ref, fixes] of perRef) {
        const list = byRoute.get(ref) ?? [];
        list.push({ uploadId: up.uploadId, sigmaM: up.sigmaM, surveyGrade: up.surveyGrade, laidOn: up.laidOn, fixes, ...(walked ? { intervals: walked.get(ref) ?? [] } : {}) });
        byRoute.set(ref, list);
      }
      for (const run of ends.unmatched) {
        // a trench runs straight for tens of metres: ±6 fixes (about 15 m of walking) smooth a handheld walk
        const k = up.surveyGrade ? 0 : 6;
        // what is left of a smoothed walk's noise: about σ/√(2k+1) per point; simplify within twice that
        const line = unplannedLine(run.fixes.map((f) => [f.lon, f.lat] as LonLat), { k, simplifyM: (2 * up.sigmaM) / Math.sqrt(2 * k + 1) });
        // a trench laid on past a route's end starts at that end: the line joins the network there
        const coords = [...(run.from ? [run.from] : []), ...line, ...(run.to && (!run.from || distanceM(run.from, run.to) > 1) ? [run.to] : [])];
        const lengthM = lineLengthM(coords);
        if (lengthM < 2) continue;
        stats.unplannedRuns++;
        const bias = up.surveyGrade ? 0 : 1;
        drafts.push({
          ref: null, fromChainageM: 0, toChainageM: lengthM, status: 'unplanned', coords, lengthM,
          maxOffsetM: 0, p95OffsetM: 0, accuracyM: R95_FACTOR * Math.sqrt((up.sigmaM * up.sigmaM) / (2 * k + 1) + bias * bias),
          sourceUploadIds: [up.uploadId], laidOn: up.laidOn,
        });
      }
      timingsMs.visitsMs += performance.now() - t1;
    }
    opts.onProgress?.((u + 1) / Math.max(1, sorted.length));
  }
  const inRefOrder = [...routes].sort((a, b) => a.ref.localeCompare(b.ref));
  for (let from = 0; from < inRefOrder.length; from += 50) {
    await breathe();
    const t0 = performance.now();
    drafts.push(...routeSections(inRefOrder.slice(from, from + 50), byRoute, corrections, opts.toleranceM));
    timingsMs.sectionsMs += performance.now() - t0;
  }
  const observations = observationSeries(byRoute);
  if (opts.timings) stats.timingsMs = timingsMs;
  return { drafts, stats, observations };
}

// The loops of a reconciliation are functions of their own, not inline in reconcileProject: V8 optimises a
// small function quickly and keeps its code, where one large function runs its loops unoptimised, each run,
// until its long compilation is done.

/** A trace's matched fixes by route, in match order: the matched fixes themselves are the observations (chainage, offset, time), no copy of each. */
function fixesByRoute(matched: MatchedFix[]): Map<string, RouteObservations['fixes']> {
  const perRef = new Map<string, RouteObservations['fixes']>();
  for (const m of matched) {
    const list = perRef.get(m.ref);
    if (list) list.push(m);
    else perRef.set(m.ref, [m]);
  }
  return perRef;
}

/** The sections of some routes from their observations, with the engineer's corrections applied. */
function routeSections(routes: PlannedRouteInput[], byRoute: Map<string, RouteObservations[]>, corrections: Correction[], toleranceM: number): SectionDraft[] {
  const drafts: SectionDraft[] = [];
  for (const r of routes) {
    const built = buildRouteSections(r, byRoute.get(r.ref) ?? [], { toleranceM, breaksM: splitPoints(corrections, r.ref) });
    for (const d of applyRouteCorrections(r, built, corrections)) drafts.push(d);
  }
  return drafts;
}

/** Each route's observations per upload, for the offset-versus-chainage plot, by route reference. */
function observationSeries(byRoute: Map<string, RouteObservations[]>): RouteObservationSeries[] {
  const observations: RouteObservationSeries[] = [];
  for (const [ref, list] of [...byRoute].sort((a, b) => a[0].localeCompare(b[0]))) {
    // per upload, its traces' fixes on the route: the arrays made at their full size, then filled
    const sizes = new Map<string, number>();
    for (const o of list) sizes.set(o.uploadId, (sizes.get(o.uploadId) ?? 0) + o.fixes.length);
    const perUpload = new Map<string, RouteObservationSeries & { filled: number }>();
    for (const o of list) {
      let series = perUpload.get(o.uploadId);
      if (!series) {
        const n = sizes.get(o.uploadId)!;
        series = { ref, uploadId: o.uploadId, chainageM: new Array<number>(n), offsetM: new Array<number>(n), timeS: new Array<number | null>(n), filled: 0 };
        perUpload.set(o.uploadId, series);
      }
      for (const f of o.fixes) {
        series.chainageM[series.filled] = f.chainageM;
        series.timeS[series.filled] = f.t;
        series.offsetM[series.filled++] = f.offsetM;
      }
    }
    for (const { ref: r, uploadId, chainageM, offsetM, timeS } of perUpload.values()) observations.push({ ref: r, uploadId, chainageM, offsetM, timeS });
  }
  return observations;
}
