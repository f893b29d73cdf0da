// node --import tsx scripts/bench-match.ts — the reconciliation job's service function (reconcileProject: HMM
// map matching, then the sections of every route) on a generated ~30 km / 2,000-route network and one upload of
// 100,000 handheld fixes, then a naive baseline (@turf/nearest-point-on-line onto every route) in the same run.
//   BENCH_FIXES=100000 BENCH_RUNS=5 BENCH_WARMUP_FIXES=20000 BENCH_WARMUP_RUNS=4 BENCH_NAIVE_FIXES=2000
//
// Each measured run is a process of its own, as a job worker is: it reads the plan and the fixes (here from
// a JSON file; the job reads them from the database), warms up on a smaller upload over the same network
// (BENCH_WARMUP_FIXES, BENCH_WARMUP_RUNS = 4 times: V8 compiles and optimises the code as it runs; the warm-up
// times, printed in order, show it settle by the third or fourth), then reconciles the whole upload once.
// Its peak RSS is that process's, start to end. One more process reconciles the whole upload cold.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { nearestPointOnLine } from '@turf/nearest-point-on-line';
import { lineString } from '@turf/helpers';
import { appendCandidatesAt, CandidateColumns, makeCandidateIndex, toFrameInto } from '../lib/matching/candidates';
import type { Fix } from '../lib/matching/match-types';
import { resolveMatchOptions } from '../lib/matching/match-types';
import { reconcileProject, type UploadTraces } from '../lib/matching/reconcile-project';
import type { PlannedRouteInput } from '../lib/matching/types';
import { gridScenario } from '../tests/unit/matching/scenario';

const FIXES = Number(process.env.BENCH_FIXES ?? 100_000);
const RUNS = Math.max(1, Number(process.env.BENCH_RUNS ?? 5));
const WARMUP_FIXES = Number(process.env.BENCH_WARMUP_FIXES ?? 20_000);
const WARMUP_RUNS = Math.max(1, Number(process.env.BENCH_WARMUP_RUNS ?? 4));
const NAIVE = Number(process.env.BENCH_NAIVE_FIXES ?? 2_000);
const TOLERANCE_M = 0.5; // the projects table's default lateral tolerance
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const range = (xs: number[], digits = 3) => `${Math.min(...xs).toFixed(digits)}–${Math.max(...xs).toFixed(digits)}`;
const line = (label: string, s: number, n: number) => console.log(`${label.padEnd(66)} ${s.toFixed(3)} s  ${Math.round(n / s).toLocaleString('en')} fixes/s`);

interface Fixture {
  routes: PlannedRouteInput[];
  totalLengthM: number;
  fixes: Fix[];
}
/** What one measuring process reports. */
interface Measured {
  wholeS: number;
  prepareS: number;
  matchS: number;
  visitsS: number;
  sectionsS: number;
  warmupS: number[];
  peakRssMB: number;
  summary: string;
}
const warmupFile = (file: string) => file.replace(/\.json$/, '-warmup.json');
const readFixture = (file: string) => JSON.parse(readFileSync(file, 'utf8')) as Fixture;
const uploadOf = (fixes: Fix[]): UploadTraces => ({ uploadId: 'bench', sigmaM: 4, surveyGrade: false, laidOn: null, traces: [fixes] });

// the search reconcileProject's matcher runs: its σ covers the source's noise and the tolerated departure
const searchOptions = () => resolveMatchOptions({ sigmaM: Math.hypot(uploadOf([]).sigmaM, Math.max(TOLERANCE_M, 1)) });

/**
 * The candidate search on its own, in a process of its own (its index and columns stay out of the whole
 * match's memory): warmed up the same way, then timed over every fix.
 */
function measureSearch(file: string): { searchS: number; perFix: number } {
  const run = (fixes: Fix[], index: ReturnType<typeof makeCandidateIndex>) => {
    const o = searchOptions();
    const columns = new CandidateColumns();
    const point = { x: new Float64Array(1), y: new Float64Array(1), kx: new Float64Array(1), ky: new Float64Array(1) };
    let found = 0;
    for (const f of fixes) {
      // each fix into the index's frame, then searched: what the matcher does, a trace's fixes at a time
      toFrameInto(index, f.lon, f.lat, point, 0);
      found += appendCandidatesAt(index, point, 0, o.searchRadiusM, o.maxCandidates, columns);
      columns.length = 0;
    }
    return found;
  };
  const { routes, fixes } = readFixture(file);
  const index = makeCandidateIndex(routes);
  for (let k = 0; k < WARMUP_RUNS; k++) run(fixes.slice(0, WARMUP_FIXES), index);
  const t0 = performance.now();
  const found = run(fixes, index);
  return { searchS: (performance.now() - t0) / 1000, perFix: found / fixes.length };
}

/** One measuring process: optional warm-up on the warm-up upload (the first WARMUP_FIXES fixes), then the whole upload once. */
async function measure(file: string, warm: boolean): Promise<Measured> {
  const warmupS: number[] = [];
  if (warm) {
    for (let k = 0; k < WARMUP_RUNS; k++) {
      const { routes, fixes } = readFixture(warmupFile(file));
      const t = performance.now();
      await reconcileProject(routes, [uploadOf(fixes)], { toleranceM: TOLERANCE_M });
      warmupS.push((performance.now() - t) / 1000);
    }
  }
  const plan = readFixture(file);
  const t = performance.now();
  const { drafts, stats } = await reconcileProject(plan.routes, [uploadOf(plan.fixes)], { toleranceM: TOLERANCE_M, timings: true });
  const wholeS = (performance.now() - t) / 1000;
  const built = drafts.filter((d) => d.status !== 'not_built').reduce((n, d) => n + d.lengthM, 0);
  const tm = stats.timingsMs!;
  return {
    wholeS, prepareS: tm.prepareMs / 1000, matchS: tm.matchMs / 1000, visitsS: tm.visitsMs / 1000, sectionsS: tm.sectionsMs / 1000,
    warmupS, peakRssMB: process.resourceUsage().maxRSS / 1024,
    summary: `matched ${stats.matched}, outliers ${stats.outliers}, unplanned runs ${stats.unplannedRuns}, pieces ${stats.pieces}; ${drafts.length} sections, ${(built / 1000).toFixed(2)} km built`,
  };
}

async function main() {
  if (process.env.BENCH_FIXTURE_TO) {
    // the generator's own memory (~90 MB) stays out of the measuring processes
    const gs = gridScenario(11, { blocks: 7, fixes: FIXES });
    const fixes = gs.handheld.map((h) => h.fix);
    writeFileSync(process.env.BENCH_FIXTURE_TO, JSON.stringify({ routes: gs.routes, totalLengthM: gs.totalLengthM, fixes } satisfies Fixture));
    // the warm-up upload on its own: a warm-up reads just what it matches, as a job reads just its upload
    writeFileSync(warmupFile(process.env.BENCH_FIXTURE_TO), JSON.stringify({ routes: gs.routes, totalLengthM: gs.totalLengthM, fixes: fixes.slice(0, WARMUP_FIXES) } satisfies Fixture));
    return;
  }
  if (process.env.BENCH_SEARCH) {
    process.stdout.write(`${JSON.stringify(measureSearch(process.env.BENCH_SEARCH))}\n`);
    return;
  }
  if (process.env.BENCH_MEASURE) {
    const m = await measure(process.env.BENCH_MEASURE, process.env.BENCH_WARM === '1');
    process.stdout.write(`${JSON.stringify(m)}\n`);
    return;
  }
  const dir = mkdtempSync(join(tmpdir(), 'bench-match-'));
  const file = join(dir, 'fixture.json');
  const child = (env: Record<string, string>) => execFileSync(process.execPath, [...process.execArgv, __filename], { env: { ...process.env, ...env }, encoding: 'utf8', maxBuffer: 1 << 20 });
  child({ BENCH_FIXTURE_TO: file });
  const { routes, totalLengthM, fixes } = readFixture(file);
  console.log(`network: ${routes.length} routes, ${(totalLengthM / 1000).toFixed(1)} km; one upload: ${fixes.length.toLocaleString('en')} handheld fixes at 1 Hz (σ 4 m)`);
  const runs: Measured[] = [];
  for (let r = 0; r < RUNS; r++) runs.push(JSON.parse(child({ BENCH_MEASURE: file, BENCH_WARM: '1' })) as Measured);
  const cold = JSON.parse(child({ BENCH_MEASURE: file, BENCH_WARM: '0' })) as Measured;
  const searches = Array.from({ length: RUNS }, () => JSON.parse(child({ BENCH_SEARCH: file })) as { searchS: number; perFix: number });
  rmSync(dir, { recursive: true });

  const n = fixes.length;
  const o = searchOptions();
  console.log(`\nabsolute figures (this machine), medians of ${RUNS} processes, each warmed up ${WARMUP_RUNS} times on ${WARMUP_FIXES.toLocaleString('en')} of the fixes`);
  line(`candidate search (${o.searchRadiusM.toFixed(1)} m, ≤ ${o.maxCandidates}), on its own`, median(searches.map((m) => m.searchS)), n);
  line('graph and candidate index (buildRouteGraph, prepareMatchNetwork)', median(runs.map((m) => m.prepareS)), n);
  line('Viterbi: matchTrace (thinning, candidates, transitions, recursion)', median(runs.map((m) => m.matchS)), n);
  line('visits (junction hops, route ends, walked intervals)', median(runs.map((m) => m.visitsS)), n);
  line('section building (buildRouteSections, every route)', median(runs.map((m) => m.sectionsS)), n);
  line('whole match: reconcileProject', median(runs.map((m) => m.wholeS)), n);
  console.log(`  (whole match in the ${RUNS} processes: ${range(runs.map((m) => m.wholeS))} s; their warm-ups on ${WARMUP_FIXES.toLocaleString('en')} fixes, in order: ${runs.map((m) => m.warmupS.map((x) => x.toFixed(2)).join(', ')).join(' | ')} s)`);
  console.log(`${runs[0].summary}; ${searches[0].perFix.toFixed(2)} candidates a fix`);
  console.log(`peak RSS of a measuring process, start to end: ${range(runs.map((m) => m.peakRssMB), 0)} MB`);
  line('\nwhole match in a fresh process, no warm-up (the code compiled as it runs)', cold.wholeS, n);
  console.log(`peak RSS of that process: ${cold.peakRssMB.toFixed(0)} MB`);

  const lines = routes.map((r) => lineString(r.coords));
  const t = performance.now();
  let sink = 0;
  for (const f of fixes.slice(0, NAIVE)) {
    let best = Infinity;
    for (const l of lines) best = Math.min(best, nearestPointOnLine(l, [f.lon, f.lat], { units: 'meters' }).properties.pointDistance);
    sink += best;
  }
  const naive = (performance.now() - t) / 1000;
  console.log(`\nnaive baseline, on a ${NAIVE.toLocaleString('en')}-fix subset: @turf/nearest-point-on-line onto every route`);
  line('nearest route by brute force', naive, NAIVE);
  const perFix = (s: number) => naive / NAIVE / (s / n);
  console.log(`(checksum ${sink.toFixed(1)} m; the candidate search above is ${perFix(median(searches.map((m) => m.searchS))).toFixed(0)}× faster per fix, the whole match ${perFix(median(runs.map((m) => m.wholeS))).toFixed(0)}×)`);
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
