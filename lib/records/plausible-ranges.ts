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
export function rangedNumber(r: PlausibleRange) {
  return z
    .number({ message: `${r.what} must be a number of metres.` })
    .min(r.min, rangeProblem(r, r.min - 1))
    .max(r.max, rangeProblem(r, r.max + 1));
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
