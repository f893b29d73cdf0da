/**
 * The verdict of a surface restoration against the project's settings: pass, warn or fail per stretch,
 * with the reasons in sentences.
 *
 * - fail: a laying temperature outside target ± tolerance (every reading counts: one cold load is a cold
 *   patch), or a laid thickness below the required one.
 * - warn: no temperature recorded (nothing shows the material was hot enough, but nothing shows it was not),
 *   no laid thickness recorded, fewer compaction passes than the project's default, or laying later than
 *   `restorationMaxDelayMin` after the edges were cleaned ("late": dust and water settle on cleaned edges).
 * - pass: none of these.
 *
 *   restorationVerdict({ temperaturesC: [196, 190], laidThicknessMm: 40, requiredThicknessMm: 40,
 *     compactionPasses: 3, edgesCleanedAt: '2026-11-03T08:00:00Z', surfaceLaidAt: '2026-11-03T08:20:00Z' },
 *     { layingTempTargetC: 195, layingTempToleranceC: 15, compactionPassesDefault: 3, restorationMaxDelayMin: 60 })
 *   → { verdict: 'pass', late: false, outOfTolerance: false, reasons: [] }
 */

export type Verdict = 'pass' | 'warn' | 'fail';

export interface RestorationFacts {
  temperaturesC: number[];
  laidThicknessMm: number | null;
  requiredThicknessMm: number;
  compactionPasses: number;
  /** instants (ISO) or null when not recorded */
  edgesCleanedAt: string | null;
  surfaceLaidAt: string | null;
}

export interface RestorationLimits {
  layingTempTargetC: number;
  layingTempToleranceC: number;
  compactionPassesDefault: number;
  restorationMaxDelayMin: number;
}

export interface RestorationReason {
  severity: 'warn' | 'fail';
  kind: 'temperature' | 'no_temperature' | 'thickness' | 'no_thickness' | 'passes' | 'late';
  text: string;
}

export interface RestorationVerdict {
  verdict: Verdict;
  /** a temperature or the thickness out of tolerance: the `restoration_out_of_tolerance` check */
  outOfTolerance: boolean;
  /** laid more than the project's limit after cleaning: the `restoration_late` check */
  late: boolean;
  /** minutes from cleaning to laying, when both are recorded */
  delayMin: number | null;
  reasons: RestorationReason[];
}

const num = (v: number) => String(Number(v.toFixed(1)));

/** Minutes from `from` to `to` (instants), or null when either is missing. */
export function minutesBetween(from: string | null, to: string | null): number | null {
  if (!from || !to) return null;
  return (Date.parse(to) - Date.parse(from)) / 60_000;
}

/** Whether a reading lies within target ± tolerance, ends included. */
export function temperatureInTolerance(tempC: number, limits: Pick<RestorationLimits, 'layingTempTargetC' | 'layingTempToleranceC'>): boolean {
  // compared to a tenth of a degree: 180.00000001 is 180 on any thermometer
  return Math.round(Math.abs(tempC - limits.layingTempTargetC) * 10) <= Math.round(limits.layingTempToleranceC * 10);
}

export function restorationVerdict(r: RestorationFacts, limits: RestorationLimits): RestorationVerdict {
  const reasons: RestorationReason[] = [];
  const lo = limits.layingTempTargetC - limits.layingTempToleranceC;
  const hi = limits.layingTempTargetC + limits.layingTempToleranceC;
  if (r.temperaturesC.length === 0) {
    reasons.push({ severity: 'warn', kind: 'no_temperature', text: 'No laying temperature recorded.' });
  } else {
    const out = r.temperaturesC.filter((t) => !temperatureInTolerance(t, limits));
    if (out.length > 0) {
      reasons.push({ severity: 'fail', kind: 'temperature', text: `Laying temperature ${out.map((t) => `${num(t)} °C`).join(', ')} outside ${num(lo)}–${num(hi)} °C.` });
    }
  }
  if (r.laidThicknessMm === null) {
    reasons.push({ severity: 'warn', kind: 'no_thickness', text: 'No laid thickness recorded.' });
  } else if (r.laidThicknessMm < r.requiredThicknessMm) {
    reasons.push({ severity: 'fail', kind: 'thickness', text: `Laid ${r.laidThicknessMm} mm thick, below the required ${r.requiredThicknessMm} mm.` });
  }
  if (r.compactionPasses < limits.compactionPassesDefault) {
    reasons.push({ severity: 'warn', kind: 'passes', text: `${r.compactionPasses} compaction ${r.compactionPasses === 1 ? 'pass' : 'passes'}, fewer than the project's ${limits.compactionPassesDefault}.` });
  }
  const delayMin = minutesBetween(r.edgesCleanedAt, r.surfaceLaidAt);
  const late = delayMin !== null && delayMin > limits.restorationMaxDelayMin;
  if (late) {
    reasons.push({ severity: 'warn', kind: 'late', text: `Laid ${Math.round(delayMin!)} min after the edges were cleaned, more than the project's ${limits.restorationMaxDelayMin} min.` });
  }
  const outOfTolerance = reasons.some((x) => x.severity === 'fail');
  const verdict: Verdict = outOfTolerance ? 'fail' : reasons.length > 0 ? 'warn' : 'pass';
  return { verdict, outOfTolerance, late, delayMin, reasons };
}
