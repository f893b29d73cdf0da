import { z } from 'zod';
import { RANGES, rangedNumber } from './plausible-ranges';

/**
 * The fields of a surface restoration, for the API and the form alike (the same zod schema on both sides).
 * Times are wall-clock times on the project's clock (`YYYY-MM-DDTHH:mm`, the form of a datetime-local box);
 * the service reads them in the project's time zone and stores instants. Temperatures are °C (the form
 * takes °F on imperial projects and sends °C).
 */

export const RESTORATION_LIMITS = {
  /** a reading of hot bituminous material: 0–400 °C takes in cold readings and any hot mix [practice] */
  tempC: { min: 0, max: 400 },
  /** laid thickness: 1–500 mm, the surface thickness setting's ceiling */
  laidThicknessMm: { min: 1, max: 500 },
  readings: 50,
  crew: 200,
} as const;

const WALL = /^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}(:\d{2})?$/;
const wallTime = (what: string) => z.string({ message: `Give ${what} as a date and time (YYYY-MM-DDTHH:mm).` }).regex(WALL, `Give ${what} as a date and time (YYYY-MM-DDTHH:mm).`);

export const temperatureReadingSchema = z.object({
  measuredAt: wallTime('the time of the reading').nullable().optional(),
  tempC: z
    .number({ message: 'A laying temperature must be a number of degrees.' })
    .min(RESTORATION_LIMITS.tempC.min, `A laying temperature must be at least ${RESTORATION_LIMITS.tempC.min} °C.`)
    .max(RESTORATION_LIMITS.tempC.max, `A laying temperature must be at most ${RESTORATION_LIMITS.tempC.max} °C.`),
});

const chainage = rangedNumber(RANGES.chainageM);

const fields = {
  restoredAt: wallTime('the date and time of the restoration'),
  backfillMaterialId: z.uuid('Pick the backfill material from the catalogue.').nullable().optional(),
  compactionPasses: rangedNumber(RANGES.compactionPassesDefault, { int: true }).optional(),
  requiredThicknessMm: rangedNumber(RANGES.surfaceThicknessMm).transform(Math.round).optional(),
  laidThicknessMm: z
    .number({ message: 'The laid thickness must be a number of millimetres.' })
    .min(RESTORATION_LIMITS.laidThicknessMm.min, `The laid thickness must be at least ${RESTORATION_LIMITS.laidThicknessMm.min} mm.`)
    .max(RESTORATION_LIMITS.laidThicknessMm.max, `The laid thickness must be at most ${RESTORATION_LIMITS.laidThicknessMm.max} mm.`)
    .transform(Math.round)
    .nullable()
    .optional(),
  edgesCleanedAt: wallTime('the time the edges were cleaned').nullable().optional(),
  surfaceLaidAt: wallTime('the time the surface was laid').nullable().optional(),
  crew: z.string().trim().max(RESTORATION_LIMITS.crew, `Keep the crew under ${RESTORATION_LIMITS.crew} characters.`).optional(),
  note: z.string().trim().max(1000, 'Keep the note under 1000 characters.').optional(),
  temperatures: z.array(temperatureReadingSchema).max(RESTORATION_LIMITS.readings, `At most ${RESTORATION_LIMITS.readings} temperature readings.`).optional(),
};

type Shape = { fromChainageM?: number; toChainageM?: number; edgesCleanedAt?: string | null; surfaceLaidAt?: string | null };
function checkShape(v: Shape, ctx: z.RefinementCtx): void {
  if (v.fromChainageM !== undefined && v.toChainageM !== undefined && v.toChainageM <= v.fromChainageM) {
    ctx.addIssue({ code: 'custom', path: ['toChainageM'], message: 'The stretch must end after it starts (to chainage above from chainage).' });
  }
  // wall times of one zone compare as text (same form, same clock)
  if (v.edgesCleanedAt && v.surfaceLaidAt && v.surfaceLaidAt.replace(' ', 'T') < v.edgesCleanedAt.replace(' ', 'T')) {
    ctx.addIssue({ code: 'custom', path: ['surfaceLaidAt'], message: 'The surface is laid after the edges are cleaned: check the two times.' });
  }
}

/** A new restoration: the stretch, when, and what was done; `temperatures` replace nothing (there are none yet). */
export const restorationSchema = z
  .object({ routeId: z.uuid('Pick the route.'), fromChainageM: chainage, toChainageM: chainage, ...fields })
  .superRefine(checkShape);

/** A change: any field; `temperatures`, when sent, replace the readings. */
export const restorationPatchSchema = z
  .object({ fromChainageM: chainage.optional(), toChainageM: chainage.optional(), ...fields, restoredAt: fields.restoredAt.optional() })
  .superRefine(checkShape);

export type RestorationInput = z.infer<typeof restorationSchema>;
export type RestorationPatch = z.infer<typeof restorationPatchSchema>;
export type TemperatureReadingInput = z.infer<typeof temperatureReadingSchema>;
