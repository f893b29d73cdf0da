import { z } from 'zod';
import { RANGES, plausibleDate, rangedNumber } from './plausible-ranges';

/**
 * The fields of a road crossing's record, for the API and the form alike (the same zod schema on both
 * sides). The stretch defaults to the whole crossing route; a date built needs "built"; ducts are a count
 * of one catalogue size (a crossing usually carries one or two microducts of 14 or 16 mm [practice]).
 */

const chainage = rangedNumber(RANGES.chainageM);

export const CROSSING_LIMITS = {
  /** a crossing is a short cut across one street: 500 m is far beyond any [practice] */
  lengthM: { min: 0.1, max: 500 },
  ductCount: { min: 1, max: 48 },
} as const;

const fields = {
  fromChainageM: chainage.optional(),
  toChainageM: chainage.optional(),
  built: z.boolean({ message: 'Say whether the crossing is built (true or false).' }).optional(),
  builtOn: plausibleDate('the date built').nullable().optional(),
  lengthM: z
    .number({ message: 'The measured length must be a number of metres.' })
    .min(CROSSING_LIMITS.lengthM.min, `The measured length must be at least ${CROSSING_LIMITS.lengthM.min} m.`)
    .max(CROSSING_LIMITS.lengthM.max, `The measured length must be at most ${CROSSING_LIMITS.lengthM.max} m: a road crossing is a short cut across one street.`)
    .nullable()
    .optional(),
  sawnBeforeMain: z.boolean({ message: 'Say whether the crossing was sawn before the lengthways cut (true or false).' }).nullable().optional(),
  ductCount: z
    .number({ message: 'The number of ducts must be a whole number.' })
    .int('The number of ducts must be a whole number.')
    .min(CROSSING_LIMITS.ductCount.min, 'A crossing carries at least one duct (leave it empty when not recorded).')
    .max(CROSSING_LIMITS.ductCount.max, `At most ${CROSSING_LIMITS.ductCount.max} ducts in one crossing.`)
    .nullable()
    .optional(),
  ductSizeId: z.uuid('Pick the duct size from the catalogue.').nullable().optional(),
  addressRef: z.string().trim().max(200, 'Keep the address under 200 characters.').nullable().optional(),
  note: z.string().trim().max(1000, 'Keep the note under 1000 characters.').optional(),
};

type Shape = { fromChainageM?: number; toChainageM?: number; built?: boolean; builtOn?: string | null };
function checkShape(v: Shape, ctx: z.RefinementCtx): void {
  if (v.fromChainageM !== undefined && v.toChainageM !== undefined && v.toChainageM <= v.fromChainageM) {
    ctx.addIssue({ code: 'custom', path: ['toChainageM'], message: 'The stretch must end after it starts (to chainage above from chainage).' });
  }
  if (v.built === false && v.builtOn) ctx.addIssue({ code: 'custom', path: ['builtOn'], message: 'A crossing not built has no date built: tick "built" or clear the date.' });
}

/** A new crossing record: `{ routeId, built, builtOn, lengthM, sawnBeforeMain, ductCount, ductSizeId, addressRef, note }`. */
export const roadCrossingSchema = z.object({ routeId: z.uuid('Pick the crossing route.'), ...fields }).superRefine(checkShape);

/** A change: any of the fields (the route stays). */
export const roadCrossingPatchSchema = z.object(fields).superRefine(checkShape);

export type RoadCrossingInput = z.infer<typeof roadCrossingSchema>;
export type RoadCrossingPatch = z.infer<typeof roadCrossingPatchSchema>;
