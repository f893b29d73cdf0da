import { z } from 'zod';

/** A range a typed number must fall in, with the unit and the words a person reads when it does not. */
export interface PlausibleRange {
  min: number;
  max: number;
  unit: string;
  /** what the number is, as a field label would say it */
  what: string;
}

/**
 * The plausible range of every number a person types into Trenchbook. The floors matter as much as the
 * ceilings: a σ of 1e-320 m passes "above zero" and gives sections an accuracy of 0, which reads as
 * perfect. The database holds the same bounds as CHECK constraints (migration 20261205120100).
 */
export const RANGES = {
  /**
   * 5 cm: a micro-trench slot is 2–15 cm wide and RTK sets out to 1–2 cm [practice]; a tighter tolerance
   * calls every trench a deviation. 50 m: further off, the trench is in another street, not off the design.
   */
  lateralToleranceM: { min: 0.05, max: 50, unit: 'm', what: 'The lateral tolerance' },
  /**
   * 5 cm: nano-trenches in the asphalt layer lay ducts a few centimetres deep [practice]. 2 m: deeper is
   * not a sawn slot but open-cut trenching or drilling; micro-trench cover is typically 0.2–0.6 m [practice].
   */
  minCoverDepthM: { min: 0.05, max: 2, unit: 'm', what: 'The minimum cover depth' },
  /**
   * σ per axis. 5 mm: a total station over site distances, the most precise source a crew brings
   * [practice]; nothing in the field is measured better. 100 m: a rough sketch digitised from a small-scale
   * map; beyond that a position says nothing about which street the duct is in.
   */
  sigmaM: { min: 0.005, max: 100, unit: 'm', what: 'σ' },
  /**
   * Metres along a planned route or a trace. 100 km: far more than one route or one day's trace; a number
   * beyond it is a typo (or grid coordinates typed into the wrong field).
   */
  chainageM: { min: 0, max: 100_000, unit: 'm', what: 'A chainage' },
  // The record settings (migration 20261205130000 holds the same bounds). Micro-trench slots are about
  // 24 mm wide and 480 mm deep [practice]; the bounds take in nano-trenches and narrow open cuts.
  trenchWidthMm: { min: 5, max: 300, unit: 'mm', what: 'The trench width' },
  trenchDepthMm: { min: 50, max: 2000, unit: 'mm', what: 'The trench depth' },
  /** 0 allows "touching is tolerated"; 5 m is beyond any clearance rule we know of [memory]. */
  minClearanceM: { min: 0, max: 5, unit: 'm', what: 'The minimum clearance' },
  gapThresholdM: { min: 0.5, max: 1000, unit: 'm', what: 'The gap threshold' },
  restorationMaxDelayMin: { min: 1, max: 10080, unit: 'min', what: 'The longest wait from cleaning to laying' },
  /** Hot bituminous material is laid at around 195 °C [practice]; 80–300 °C takes in warm and hot mixes. */
  layingTempTargetC: { min: 80, max: 300, unit: '°C', what: 'The laying temperature target' },
  layingTempToleranceC: { min: 1, max: 100, unit: '°C', what: 'The laying temperature tolerance' },
  compactionPassesDefault: { min: 0, max: 20, unit: 'passes', what: 'The number of compaction passes' },
  surfaceThicknessMm: { min: 5, max: 500, unit: 'mm', what: 'The surface thickness' },
  // The household settings (migration 20261206100000 holds the same bounds as CHECKs).
  /** 1 m: an address on the route's line; 500 m: beyond it a house is not on that street but on another. */
  serveDistanceM: { min: 1, max: 500, unit: 'm', what: 'The serve distance' },
  /** The Bundesnetzagentur counts a home passed within 20 m of its plot [published]; 200 m is a long drop. */
  crossingServeDistanceM: { min: 1, max: 200, unit: 'm', what: 'The crossing distance' },
  /** 0: the stretch must reach the foot point exactly; 50 m is about a plot's frontage several times over. */
  footToleranceM: { min: 0, max: 50, unit: 'm', what: 'The foot tolerance' },
} as const satisfies Record<string, PlausibleRange>;

/**
 * Surveys and lay dates: not before 1990 (no GNSS field survey of a fibre network is older) and not after
 * tomorrow (a day ahead allows for time zones); a date outside is a typo.
 */
export const DATE_RANGE = { min: '1990-01-01', maxDaysAhead: 1 } as const;

const fmt = (n: number) => n.toLocaleString('en-GB', { maximumFractionDigits: 6 });

/** "0.05–50 m": the range as shown beside a field. */
export function rangeText(r: PlausibleRange): string {
  return `${fmt(r.min)}–${fmt(r.max)} ${r.unit}`;
}

/** The message for a number out of range, or undefined when it is in range: used by forms and schemas alike. */
export function rangeProblem(r: PlausibleRange, v: number): string | undefined {
  if (!Number.isFinite(v)) return `${r.what} must be a number of ${r.unit === 'm' ? 'metres' : r.unit}.`;
  if (v < r.min) return `${r.what} must be at least ${fmt(r.min)} ${r.unit} (plausible: ${rangeText(r)}).`;
  if (v > r.max) return `${r.what} must be at most ${fmt(r.max)} ${r.unit} (plausible: ${rangeText(r)}).`;
  return undefined;
}

/** A zod number within the range, with the range's messages: `rangedNumber(RANGES.lateralToleranceM)`. */
export function rangedNumber(r: PlausibleRange, opts: { int?: boolean } = {}) {
  const unitWords: Record<string, string> = { m: 'metres', mm: 'millimetres', min: 'minutes', '°C': 'degrees Celsius' };
  const n = z
    .number({ message: `${r.what} must be a number of ${unitWords[r.unit] ?? r.unit}.` })
    .min(r.min, rangeProblem(r, r.min - 1))
    .max(r.max, rangeProblem(r, r.max + 1));
  return opts.int ? n.int(`${r.what} must be a whole number of ${unitWords[r.unit] ?? r.unit}.`) : n;
}

/** A calendar date (YYYY-MM-DD) between DATE_RANGE.min and tomorrow, with `what` in the message. */
export function plausibleDate(what: string, now: () => Date = () => new Date()) {
  return z.iso.date(`Give ${what} as YYYY-MM-DD.`).superRefine((d, ctx) => {
    const latest = new Date(now().getTime() + DATE_RANGE.maxDaysAhead * 86_400_000).toISOString().slice(0, 10);
    if (d < DATE_RANGE.min) ctx.addIssue({ code: 'custom', message: `${capital(what)} cannot be before ${DATE_RANGE.min}.` });
    else if (d > latest) ctx.addIssue({ code: 'custom', message: `${capital(what)} cannot be in the future.` });
  });
}

const capital = (s: string) => s[0].toUpperCase() + s.slice(1);
