// node --import tsx scripts/bench-match.ts — the HMM map matcher on a generated ~30 km / 2,000-route network
// and 100,000 handheld fixes, then a naive baseline (nearest point on every route by brute force) in the same run.
import { candidatesFor, makeCandidateIndex } from '../lib/matching/candidates';
import { projectOntoLine } from '../lib/matching/chainage';
import { matchTrace } from '../lib/matching/match-trace';
import { buildRouteGraph } from '../lib/matching/route-graph';
import { viterbi } from '../lib/matching/viterbi';
import { gridScenario } from '../tests/unit/matching/scenario';

const FIXES = Number(process.env.BENCH_FIXES ?? 100_000);
const NAIVE = Number(process.env.BENCH_NAIVE_FIXES ?? 2_000);
const secs = (t0: bigint) => Number(process.hrtime.bigint() - t0) / 1e9;
const line = (label: string, s: number, n: number) => console.log(`${label.padEnd(44)} ${s.toFixed(3)} s  ${Math.round(n / s).toLocaleString('en')} fixes/s`);

const gs = gridScenario(11, { blocks: 7, fixes: FIXES });
const fixes = gs.handheld.map((h) => h.fix);
const graph = buildRouteGraph(gs.routes);
console.log(`network: ${gs.routes.length} routes, ${(gs.totalLengthM / 1000).toFixed(1)} km; trace: ${fixes.length.toLocaleString('en')} handheld fixes at 1 Hz`);

let t = process.hrtime.bigint();
const index = makeCandidateIndex(gs.routes);
const build = secs(t);
t = process.hrtime.bigint();
const cands = fixes.map((f) => candidatesFor(index, f, 16, 5));
const search = secs(t);
const layers = cands.filter((c) => c.length > 0);
t = process.hrtime.bigint();
// Viterbi alone over the same layers, with a constant transition: the cost of the recursion itself
viterbi(layers.map((c) => c.length), (k, j) => -0.5 * (layers[k][j].distanceM / 4) ** 2, (k, i, j) => (layers[k - 1][i].route === layers[k][j].route ? 0 : -3));
const vit = secs(t);
t = process.hrtime.bigint();
const r = matchTrace(fixes, gs.routes, graph, { sigmaM: 4 });
const whole = secs(t);
console.log(`\nabsolute figures (this machine)`);
console.log(`${'candidate index build'.padEnd(44)} ${build.toFixed(3)} s`);
line('candidate search (16 m, ≤ 5)', search, fixes.length);
line('Viterbi recursion (constant transitions)', vit, layers.length);
line('whole matchTrace (index, graph prep, all)', whole, fixes.length);
console.log(`matched ${r.matched.length}, outliers ${r.outliers.length}, unmatched runs ${r.unmatched.length}, pieces ${r.pieces}`);
console.log(`peak RSS ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`);

t = process.hrtime.bigint();
let sink = 0;
for (const f of fixes.slice(0, NAIVE)) {
  let best = Infinity;
  for (const route of gs.routes) best = Math.min(best, projectOntoLine(route.coords, [f.lon, f.lat]).distanceM);
  sink += best;
}
const naive = secs(t);
console.log(`\nnaive baseline, on a ${NAIVE.toLocaleString('en')}-fix subset (projectOntoLine onto every route)`);
line('nearest route by brute force', naive, NAIVE);
console.log(`(checksum ${sink.toFixed(1)}; candidate search above is ${((naive / NAIVE) / (search / fixes.length)).toFixed(0)}× faster per fix)`);
