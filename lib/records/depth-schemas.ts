import { z } from 'zod';
import { pointAnchorSchema } from './anchor';

// The zod schemas of depth readings, shared by the API and the forms (react-hook-form's resolver), so a
// field refused in the browser is refused by the server with the same words.

/** Plausible depths (m): a reading beyond is a typo or millimetres typed as metres. */
export const DEPTH_LIMITS = { coverM: { min: 0, max: 5 }, trenchDepthM: { min: 0.01, max: 5 } } as const;

const depth = (what: string, lim: { min: number; max: number }) =>
  z
    .number({ message: `${what} must be a number of metres.` })
    .min(lim.min, `${what} must be at least ${lim.min} m.`)
    .max(lim.max, `${what} must be at most ${lim.max} m: depths are in metres.`);

/** A time on the project's clock (`YYYY-MM-DDTHH:mm`, as a datetime field gives it) or with its own offset. */
export const measuredAtField = z
  .string()
  .trim()
  .regex(/^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}(:\d{2}(\.\d{1,3})?)?(Z|[+-]\d{2}:?\d{2})?$/, 'Give the time as YYYY-MM-DD HH:MM.');

const readingFields = z.object({
  coverM: depth('The cover', DEPTH_LIMITS.coverM).nullable().optional(),
  trenchDepthM: depth('The trench depth', DEPTH_LIMITS.trenchDepthM).nullable().optional(),
  measuredAt: measuredAtField.nullable().optional(),
  note: z.string().trim().max(1000, 'Keep the note under 1000 characters.').optional(),
});

type Depths = { coverM?: number | null; trenchDepthM?: number | null };
export function checkDepths(v: Depths, ctx: z.RefinementCtx): void {
  const cover = v.coverM ?? null;
  const trench = v.trenchDepthM ?? null;
  if (cover === null && trench === null) ctx.addIssue({ code: 'custom', path: ['coverM'], message: 'Give the cover, the trench depth or both.' });
  if (cover !== null && trench !== null && cover > trench) ctx.addIssue({ code: 'custom', path: ['coverM'], message: 'The cover cannot be more than the trench depth.' });
}

/** A typed depth reading: where (route + chainage, or a position) and cover and/or trench depth. */
export const depthReadingSchema = z.intersection(pointAnchorSchema, readingFields).superRefine(checkDepths);
export type DepthReadingInput = z.infer<typeof depthReadingSchema>;

/** A change to a reading: any of its fields; a new chainage or position moves it. */
export const depthReadingPatchSchema = readingFields.extend({
  routeId: z.uuid('Pick the route.').optional(),
  chainageM: z.number().min(0).max(100_000).optional(),
  lon: z.number().min(-180).max(180).optional(),
  lat: z.number().min(-90).max(90).optional(),
});
export type DepthReadingPatch = z.infer<typeof depthReadingPatchSchema>;

export const depthFromUploadSchema = z.object({
  attribute: z.string().trim().min(1, 'Name the attribute that holds the depth.').max(200),
  /** what the attribute measures: the cover (default) or the trench depth */
  measures: z.enum(['cover', 'trench_depth']).default('cover'),
});

