// node --import tsx scripts/section-power.ts — how often the section test finds a trench laid off the plan, for
// docs/matching.md ("What the section test can and cannot tell"). A straight 400 m route, walked once with a
// handheld receiver (a fix every 1.2 m and every second, white noise σ 4 m per axis, plus a first-order
// Gauss–Markov bias of σ 1 m and τ 60 s, the section builder's own defaults), the trench laid at a constant
// offset over a stretch starting at 100 m; 20 seeded walks a case, 0.5 m tolerance. Prints a Markdown table:
// in how many walks a `deviates` section overlaps the stretch (and, for 0 m, anywhere on the route).
import { buildRouteSections } from '../lib/matching/build-sections';
import type { LonLat } from '../lib/matching/types';
import { mulberry32 } from '../lib/records/seeded-random';

const ROUTE: LonLat[] = [[13.4, 52.5], [13.4 + 400 / 67_800, 52.5]];
const WALKS = 20;
const STEP_M = 1.2;

function found(offsetM: number, lengthM: number, sigmaM: number, surveyGrade: boolean): number {
  let hits = 0;
  for (let seed = 1; seed <= WALKS; seed++) {
    const rng = mulberry32(seed);
    const gauss = () => Math.sqrt(-2 * Math.log(1 - rng())) * Math.cos(2 * Math.PI * rng());
    const fixes: { chainageM: number; offsetM: number; t: number | null }[] = [];
    let bias = 0;
    for (let i = 0; i * STEP_M < 400; i++) {
      const c = i * STEP_M;
      bias = surveyGrade ? 0 : bias * Math.exp(-1 / 60) + Math.sqrt(1 - Math.exp(-2 / 60)) * gauss();
      const laid = c >= 100 && c < 100 + lengthM ? offsetM : 0;
      fixes.push({ chainageM: c, offsetM: laid + sigmaM * gauss() + bias, t: surveyGrade ? null : i });
    }
    const drafts = buildRouteSections({ ref: 'R', coords: ROUTE }, [{ uploadId: 'u', sigmaM, surveyGrade, laidOn: null, fixes }], { toleranceM: 0.5 });
    const from = lengthM > 0 ? 100 : 0;
    const to = lengthM > 0 ? 100 + lengthM : 400;
    if (drafts.some((d) => d.status === 'deviates' && d.fromChainageM < to && d.toChainageM > from)) hits++;
  }
  return hits;
}

const LENGTHS = [10, 20, 40, 60, 150];
for (const [label, sigmaM, survey] of [['handheld, σ 4 m', 4, false], ['RTK, σ 2 cm', 0.02, true]] as const) {
  console.log(`\n${label}: walks (of ${WALKS}) with a deviating section over the stretch laid off the plan`);
  console.log(`| offset | ${LENGTHS.map((l) => `over ${l} m`).join(' | ')} |`);
  console.log(`|---|${LENGTHS.map(() => '---').join('|')}|`);
  for (const off of survey ? [1, 5] : [2, 3, 4, 5, 8]) console.log(`| ${off} m | ${LENGTHS.map((l) => found(off, l, sigmaM, survey)).join(' | ')} |`);
  console.log(`\nlaid on the plan all along: ${found(0, 0, sigmaM, survey)} of ${WALKS} walks show a deviating section somewhere on the 400 m`);
}
