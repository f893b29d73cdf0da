import { z } from 'zod';

/** The zod schemas of the catalogue edits, shared by the API and the catalogue page's forms. */

const mm = (what: string) =>
  z.number({ message: `${what} must be a number of millimetres.` }).gt(0, `${what} must be above 0 mm.`).max(100, `${what} must be at most 100 mm (a microduct).`);

export const ductSizeSchema = z
  .object({ outerMm: mm('The outer diameter'), innerMm: mm('The inner diameter'), common: z.boolean().optional() })
  .refine((v) => v.innerMm < v.outerMm, { message: 'The inner diameter must be below the outer.', path: ['innerMm'] });

const somethingToChange = (v: object) => Object.values(v).some((x) => x !== undefined);
const nothing = { message: 'Nothing to change: send retired, common or label.' };

export const ductSizePatchSchema = z.object({ retired: z.boolean().optional(), common: z.boolean().optional() }).refine(somethingToChange, nothing);

const hex = z
  .string({ message: 'Give the colour as #rrggbb.' })
  .trim()
  .toLowerCase()
  .regex(/^#[0-9a-f]{6}$/, 'Give the colour as #rrggbb, e.g. #1f5fbf.');

export const colourSequenceSchema = z.object({
  name: z.string({ message: 'Name the sequence.' }).trim().min(1, 'Name the sequence.').max(120, 'Keep the name under 120 characters.'),
  standard: z.string().trim().max(120, 'Keep the standard under 120 characters.').optional(),
  repeatMarking: z.enum(['stripe', 'tracer'], { message: 'Say how positions after the last colour are marked: stripe or tracer.' }),
  colours: z
    .array(z.object({ name: z.string({ message: 'Name the colour.' }).trim().min(1, 'Name the colour.').max(40, 'Keep a colour name under 40 characters.'), hex }), { message: 'List the colours in order.' })
    .min(1, 'List at least one colour.')
    .max(24, 'At most 24 colours in a sequence.')
    .refine((cs) => new Set(cs.map((c) => c.name.toLowerCase())).size === cs.length, 'Each colour appears once in a sequence.'),
});

const label = z.string({ message: 'Give the label.' }).trim().min(1, 'Give the label.').max(120, 'Keep the label under 120 characters.');

export const utilityKindSchema = z.object({
  key: z
    .string({ message: 'Give a short key, e.g. fibre_other.' })
    .trim()
    .regex(/^[a-z][a-z0-9_]{0,39}$/, 'A key is lower-case letters, digits and _, starting with a letter (at most 40).'),
  label,
});
export const utilityKindPatchSchema = z.object({ label: label.optional(), retired: z.boolean().optional() }).refine(somethingToChange, nothing);
export const backfillMaterialSchema = z.object({ label });
export const backfillMaterialPatchSchema = z.object({ label: label.optional(), retired: z.boolean().optional() }).refine(somethingToChange, nothing);
