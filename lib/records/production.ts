import { z } from 'zod';
import { plausibleDate } from './plausible-ranges';
import { formatInZone } from './zoned-time';

/**
 * Daily production per crew and day, derived from the records, correctable by hand with a reason.
 *
 * What each figure is derived from (the quantity a record shows, on the day it names, on the project's clock):
 * - laid_m: built sections (not retired, not "not built") by their laid-on date, their length; the crew is
 *   the crew named on the section's uploads.
 * - sawn_m: the slot is sawn the day its ducts are laid in micro-trenching [practice], so the laid metres,
 *   plus the measured length of the road crossings built that day (sawn across the street). Where sawing
 *   ran ahead, a correction says so.
 * - backfilled_m: restorations with a backfill material, on the day of the restoration.
 * - restored_m: restorations on the day the surface was laid (else the day of the restoration).
 * - crossings: road crossings built, by their date built. pits: test pits by the date dug.
 * A correction replaces the derived figure of its day, crew and quantity; the newest one counts, and the
 * derived figure and the reason stay visible beside it.
 *
 *   aggregateProduction([{ day: '2026-11-03', crew: 'A', quantity: 'laid_m', value: 120 }], [])
 *   → [{ day: '2026-11-03', crew: 'A', figures: { laid_m: { derived: 120, shown: 120, correction: null }, … } }]
 */

export const PRODUCTION_QUANTITIES = ['sawn_m', 'laid_m', 'backfilled_m', 'restored_m', 'crossings', 'pits'] as const;
export type ProductionQuantity = (typeof PRODUCTION_QUANTITIES)[number];

export const QUANTITY_LABELS: Record<ProductionQuantity, string> = {
  sawn_m: 'Sawn (m)', laid_m: 'Laid (m)', backfilled_m: 'Backfilled (m)', restored_m: 'Restored (m)', crossings: 'Crossings made', pits: 'Pits dug',
};

/** Counted, not measured: whole numbers. */
export const COUNTED: ReadonlySet<ProductionQuantity> = new Set(['crossings', 'pits']);

/** One derived amount: a record's contribution to a day, crew and quantity. */
export interface ProductionFact {
  day: string;
  crew: string;
  quantity: ProductionQuantity;
  value: number;
}

export interface ProductionCorrection {
  id: string;
  day: string;
  crew: string;
  quantity: ProductionQuantity;
  value: number;
  reason: string;
  createdAt: string;
  createdByName: string | null;
}

export interface ProductionFigure {
  /** from the records; null when no record gives one */
  derived: number | null;
  /** what is shown: the newest correction's value, else the derived one */
  shown: number | null;
  correction: ProductionCorrection | null;
}

export interface ProductionDay {
  day: string;
  crew: string;
  figures: Record<ProductionQuantity, ProductionFigure>;
}

/** The calendar day of an instant on the project's clock: `dayOnClock('2026-11-03T23:30:00Z', 'Europe/Berlin')` → `'2026-11-04'`. */
export function dayOnClock(instant: string | Date, timeZone: string): string {
  return formatInZone(instant, timeZone).slice(0, 10);
}

const round = (v: number, q: ProductionQuantity) => (COUNTED.has(q) ? Math.round(v) : Math.round(v * 100) / 100);

/**
 * Sums the facts per day and crew, applies the newest correction of each day, crew and quantity, and keeps
 * the days within `from`–`to` (inclusive, YYYY-MM-DD, either open). Newest day first, crews by name.
 */
export function aggregateProduction(facts: ProductionFact[], corrections: ProductionCorrection[], range: { from?: string; to?: string } = {}): ProductionDay[] {
  const inRange = (d: string) => (!range.from || d >= range.from) && (!range.to || d <= range.to);
  const rows = new Map<string, ProductionDay>();
  const rowOf = (day: string, crew: string): ProductionDay => {
    const key = `${day}\u0000${crew}`;
    let row = rows.get(key);
    if (!row) {
      const figures = {} as Record<ProductionQuantity, ProductionFigure>;
      for (const q of PRODUCTION_QUANTITIES) figures[q] = { derived: null, shown: null, correction: null };
      row = { day, crew, figures };
      rows.set(key, row);
    }
    return row;
  };
  for (const f of facts) {
    if (!inRange(f.day)) continue;
    const fig = rowOf(f.day, f.crew).figures[f.quantity];
    fig.derived = (fig.derived ?? 0) + f.value;
  }
  for (const row of rows.values()) for (const q of PRODUCTION_QUANTITIES) if (row.figures[q].derived !== null) row.figures[q].derived = round(row.figures[q].derived!, q);
  // the newest correction counts (same instant: the later in the list)
  const newest = [...corrections].sort((a, b) => Date.parse(a.createdAt) - Date.parse(b.createdAt));
  for (const c of newest) {
    if (!inRange(c.day)) continue;
    rowOf(c.day, c.crew).figures[c.quantity].correction = c;
  }
  for (const row of rows.values()) {
    for (const q of PRODUCTION_QUANTITIES) {
      const f = row.figures[q];
      f.shown = f.correction ? f.correction.value : f.derived;
    }
  }
  return [...rows.values()].sort((a, b) => (a.day === b.day ? a.crew.localeCompare(b.crew) : a.day < b.day ? 1 : -1));
}

/** Totals of the shown figures per day (all crews), oldest day first: the bar chart's data. */
export function dailyTotals(days: ProductionDay[]): ({ day: string } & Record<ProductionQuantity, number>)[] {
  const out = new Map<string, { day: string } & Record<ProductionQuantity, number>>();
  for (const d of days) {
    let t = out.get(d.day);
    if (!t) {
      t = { day: d.day, sawn_m: 0, laid_m: 0, backfilled_m: 0, restored_m: 0, crossings: 0, pits: 0 };
      out.set(d.day, t);
    }
    for (const q of PRODUCTION_QUANTITIES) t[q] = round(t[q] + (d.figures[q].shown ?? 0), q);
  }
  return [...out.values()].sort((a, b) => (a.day < b.day ? -1 : 1));
}

/** A correction as a person enters it: the figure replaced, on which day for which crew, and why. */
export const productionCorrectionSchema = z
  .object({
    day: plausibleDate('the day'),
    crew: z.string().trim().max(200, 'Keep the crew under 200 characters.').default(''),
    quantity: z.enum(PRODUCTION_QUANTITIES, { message: 'Pick what is corrected: sawn, laid, backfilled or restored metres, crossings or pits.' }),
    value: z.number({ message: 'The corrected figure must be a number.' }).min(0, 'The corrected figure cannot be negative.').max(100_000, 'The corrected figure must be at most 100000.'),
    reason: z.string({ message: 'Say why the figure is corrected.' }).trim().min(1, 'Say why the figure is corrected.').max(1000, 'Keep the reason under 1000 characters.'),
  })
  .superRefine((v, ctx) => {
    if (COUNTED.has(v.quantity) && !Number.isInteger(v.value)) ctx.addIssue({ code: 'custom', path: ['value'], message: 'Crossings and pits are counted: give a whole number.' });
  });
export type ProductionCorrectionInput = z.infer<typeof productionCorrectionSchema>;

/** `?from=&to=` of the production list. */
export const productionRangeSchema = z
  .object({
    from: z.iso.date('Give "from" as YYYY-MM-DD.').optional(),
    to: z.iso.date('Give "to" as YYYY-MM-DD.').optional(),
  })
  .refine((v) => !v.from || !v.to || v.from <= v.to, { path: ['to'], message: '"to" must not be before "from".' });
