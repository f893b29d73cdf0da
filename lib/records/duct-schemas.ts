import { z } from 'zod';
import { pointAnchorSchema } from './anchor';
import { MAX_DUCTS_IN_BUNDLE } from './duct-spec';
import { RANGES, rangedNumber } from './plausible-ranges';

/**
 * The zod schemas of duct bundles and joints: the API validates with them and the forms (react-hook-form's
 * zodResolver) with the same ones, so they live here, free of server code.
 */

export type DuctPurpose = 'feeder' | 'distribution' | 'drop' | 'spare';
export const DUCT_PURPOSES = ['feeder', 'distribution', 'drop', 'spare'] as const satisfies readonly DuctPurpose[];

const chainage = rangedNumber(RANGES.chainageM);
const mmNumber = (what: string) =>
  z.number({ message: `${what} must be a number of millimetres.` }).gt(0, `${what} must be above 0 mm.`).max(100, `${what} must be at most 100 mm (a microduct).`);

/** One duct as typed: a catalogue size or a custom outer/inner, the colour's position in the sequence, the purpose. */
export const ductInputSchema = z
  .object({
    ductSizeId: z.uuid('Pick a size from the catalogue, or give a custom size.').optional(),
    outerMm: mmNumber('The outer diameter').nullable().optional(),
    innerMm: mmNumber('The inner diameter').nullable().optional(),
    colourPosition: z
      .number({ message: 'Pick the colour.' })
      .int('Pick the colour.')
      .min(1, 'Pick the colour.')
      .max(MAX_DUCTS_IN_BUNDLE, 'Pick a colour of the sequence.'),
    purpose: z.enum(DUCT_PURPOSES, { message: 'Pick the purpose: feeder, distribution, drop or spare.' }),
  })
  .superRefine((d, ctx) => {
    if (d.ductSizeId) return;
    if (d.outerMm == null) ctx.addIssue({ code: 'custom', path: ['outerMm'], message: 'Pick a size from the catalogue, or give the outer diameter.' });
    if (d.innerMm == null) ctx.addIssue({ code: 'custom', path: ['innerMm'], message: 'Give the inner diameter of the custom size.' });
    if (d.outerMm != null && d.innerMm != null && d.innerMm >= d.outerMm) ctx.addIssue({ code: 'custom', path: ['innerMm'], message: 'The inner diameter must be below the outer.' });
  });

/** An installed bundle: the stretch, the ducts in bundle order (row n is position n), and what else went in. */
export const ductBundleSchema = z
  .object({
    routeId: z.uuid('Pick the route.'),
    fromChainageM: chainage,
    toChainageM: chainage,
    ducts: z.array(ductInputSchema).min(1, 'Add at least one duct.').max(MAX_DUCTS_IN_BUNDLE, `At most ${MAX_DUCTS_IN_BUNDLE} ducts in one bundle.`),
    tracerWire: z.boolean({ message: 'Say whether a tracer wire was laid.' }),
    warningTape: z.boolean({ message: 'Say whether warning tape was laid.' }),
    protectiveFill: z.boolean({ message: 'Say whether protective fill was placed.' }),
    note: z.string().trim().max(2000, 'Keep the note under 2,000 characters.').optional(),
  })
  .refine((v) => v.toChainageM > v.fromChainageM, { message: 'The stretch must end after it starts (to chainage above from chainage).', path: ['toChainageM'] });
export type DuctBundleInput = z.infer<typeof ductBundleSchema>;

/** A joint or connector: where (a route and chainage, or a position), which duct positions it joins. */
export const ductJointSchema = z.intersection(
  pointAnchorSchema,
  z.object({
    kind: z.enum(['joint', 'connector'], { message: 'Pick joint or connector.' }),
    ductPositions: z
      .array(z.number().int('Duct positions are whole numbers.').min(1, 'Duct positions start at 1.').max(MAX_DUCTS_IN_BUNDLE, `Duct positions go up to ${MAX_DUCTS_IN_BUNDLE}.`), { message: 'Say which ducts are joined.' })
      .min(1, 'Say which ducts are joined.')
      .max(MAX_DUCTS_IN_BUNDLE),
    note: z.string().trim().max(2000, 'Keep the note under 2,000 characters.').optional(),
  }),
);
export type DuctJointInput = z.infer<typeof ductJointSchema>;

export const ductBundlesQuerySchema = z.object({
  routeId: z.uuid('Give a route id.').optional(),
  kind: z.enum(['planned', 'installed'], { message: 'kind is planned or installed.' }).optional(),
});
