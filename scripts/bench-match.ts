// node --import tsx scripts/bench-match.ts — the reconciliation job's service function (reconcileProject: HMM
// map matching, then the sections of every route) on a generated ~30 km / 2,000-route network and one upload of
// 100,000 handheld fixes, then a naive baseline (@turf/nearest-point-on-line onto every route) in the same run.
//   BENCH_FIXES=100000 BENCH_RUNS=3 BENCH_NAIVE_FIXES=2000
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { nearestPointOnLine } from '@turf/nearest-point-on-line';
import { lineString } from '@turf/helpers';
import { appendCandidates, CandidateColumns, makeCandidateIndex } from '../lib/matching/candidates';
import type { Fix } from '../lib/matching/match-types';
import { resolveMatchOptions } from '../lib/matching/match-types';
import { reconcileProject, type UploadTraces } from '../lib/matching/reconcile-project';
import type { PlannedRouteInput } from '../lib/matching/types';
import { gridScenario } from '../tests/unit/matching/scenario';

const FIXES = Number(process.env.BENCH_FIXES ?? 100_000);
const RUNS = Math.max(1, Number(process.env.BENCH_RUNS ?? 3));
const NAIVE = Number(process.env.BENCH_NAIVE_FIXES ?? 2_000);
const TOLERANCE_M = 0.5; // the projects table's default lateral tolerance
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const line = (label: string, s: number, n: number) => console.log(`${label.padEnd(66)} ${s.toFixed(3)} s  ${Math.round(n / s).toLocaleString('en')} fixes/s`);

// The fixture is generated in a child process and handed over as JSON (numbers round-trip exactly): the job
// reads its fixes from the database, so the peak RSS below is the matching's, not the generator's (~90 MB).
interface Fixture {
  routes: PlannedRouteInput[];
  totalLengthM: number;
  fixes: Fix[];
}
if (process.env.BENCH_FIXTURE_TO) {
  const gs = gridScenario(11, { blocks: 7, fixes: FIXES });
  writeFileSync(process.env.BENCH_FIXTURE_TO, JSON.stringify({ routes: gs.routes, totalLengthM: gs.totalLengthM, fixes: gs.handheld.map((h) => h.fix) } satisfies Fixture));
  process.exit(0);
}
const dir = mkdtempSync(join(tmpdir(), 'bench-match-'));
execFileSync(process.execPath, [...process.execArgv, __filename], { env: { ...process.env, BENCH_FIXTURE_TO: join(dir, 'fixture.json') }, stdio: 'inherit' });
const { routes, totalLengthM, fixes } = JSON.parse(readFileSync(join(dir, 'fixture.json'), 'utf8')) as Fixture;
rmSync(dir, { recursive: true });
const upload: UploadTraces = { uploadId: 'bench', sigmaM: 4, surveyGrade: false, laidOn: null, traces: [fixes] };
console.log(`network: ${routes.length} routes, ${(totalLengthM / 1000).toFixed(1)} km; one upload: ${fixes.length.toLocaleString('en')} handheld fixes at 1 Hz (σ 4 m)`);

// the search reconcileProject's matcher runs: its σ covers the source's noise and the tolerated departure
const o = resolveMatchOptions({ sigmaM: Math.hypot(upload.sigmaM, Math.max(TOLERANCE_M, 1)) });
const index = makeCandidateIndex(routes);
const columns = new CandidateColumns();
const search: number[] = [];
const whole: number[] = [];
const prepare: number[] = [];
const match: number[] = [];
const visits: number[] = [];
const sections: number[] = [];
let summary = '';
let firstRss = 0;
let coldS = 0;
async function main() {
  // run 0 is the first in a fresh process: V8 compiles and optimises the code as it goes, so it is timed on
  // its own; a worker that has reconciled once runs at the speed of the runs after it (the medians below)
  for (let run = 0; run <= RUNS; run++) {
    let t = performance.now();
    let found = 0;
    for (const f of fixes) {
      found += appendCandidates(index, f, o.searchRadiusM, o.maxCandidates, columns);
      columns.length = 0;
    }
    if (run > 0) search.push((performance.now() - t) / 1000);
    // the job reads the plan and the fixes afresh each run: fresh arrays, so nothing kept per array carries over
    const plan = structuredClone(routes);
    const fresh: UploadTraces = { ...upload, traces: structuredClone(upload.traces) };
    t = performance.now();
    const { drafts, stats } = await reconcileProject(plan, [fresh], { toleranceM: TOLERANCE_M, timings: true });
    if (run === 0) {
      coldS = (performance.now() - t) / 1000;
      firstRss = process.resourceUsage().maxRSS / 1024;
      continue;
    }
    whole.push((performance.now() - t) / 1000);
    prepare.push(stats.timingsMs!.prepareMs / 1000);
    match.push(stats.timingsMs!.matchMs / 1000);
    visits.push(stats.timingsMs!.visitsMs / 1000);
    sections.push(stats.timingsMs!.sectionsMs / 1000);
    const built = drafts.filter((d) => d.status !== 'not_built').reduce((n, d) => n + d.lengthM, 0);
    summary = `matched ${stats.matched}, outliers ${stats.outliers}, unplanned runs ${stats.unplannedRuns}, pieces ${stats.pieces}; ${drafts.length} sections, ${(built / 1000).toFixed(2)} km built; ${(found / fixes.length).toFixed(2)} candidates a fix`;
  }
  console.log(`\nabsolute figures (this machine), medians of ${RUNS} run${RUNS > 1 ? 's' : ''} after the first`);
  line(`candidate search (${o.searchRadiusM.toFixed(1)} m, ≤ ${o.maxCandidates}), on its own`, median(search), fixes.length);
  line('graph and candidate index (buildRouteGraph, prepareMatchNetwork)', median(prepare), fixes.length);
  line('Viterbi: matchTrace (candidates, transitions, recursion)', median(match), fixes.length);
  line('visits (junction hops, route ends, walked intervals)', median(visits), fixes.length);
  line('section building (buildRouteSections, every route)', median(sections), fixes.length);
  line('whole match: reconcileProject', median(whole), fixes.length);
  console.log(summary);
  // the fixture is made in a child process; the later runs add the garbage of the earlier ones to the heap
  line('first run in a fresh process (the code compiled as it runs)', coldS, fixes.length);
  console.log(`peak RSS ${firstRss.toFixed(0)} MB through the first run, ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB through all ${RUNS + 1}`);

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
  console.log(`(checksum ${sink.toFixed(1)} m; the candidate search above is ${(naive / NAIVE / (median(search) / fixes.length)).toFixed(0)}× faster per fix, the whole match ${(naive / NAIVE / (median(whole) / fixes.length)).toFixed(0)}×)`);
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
