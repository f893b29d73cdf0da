import { z } from 'zod';
import { pointAnchorSchema } from './anchor';
import { plausibleDate } from './plausible-ranges';

// The zod schemas of test pits and utility crossings, shared by the API and the forms.

export const PIT_METHODS = ['hand_dug', 'vacuum', 'other'] as const;
export const CROSSING_METHODS = ['gpr', 'test_pit', 'records', 'other'] as const;

const metres = (what: string, min: number, max: number) =>
  z.number({ message: `${what} must be a number of metres.` }).min(min, `${what} must be at least ${min} m.`).max(max, `${what} must be at most ${max} m: depths are in metres.`);

const pitFields = z.object({
  name: z.string().trim().max(100, 'Keep the name under 100 characters.').optional(),
  dugOn: plausibleDate('the day dug').nullable().optional(),
  method: z.enum(PIT_METHODS, 'Pick how the pit was dug: by hand, by vacuum or otherwise.').default('hand_dug'),
  depthM: metres('The pit depth', 0.05, 10).nullable().optional(),
  findings: z.string().trim().max(4000, 'Keep the findings under 4000 characters.').optional(),
});
const moveFields = {
  routeId: z.uuid('Pick the route.').optional(),
  chainageM: z.number().min(0).max(100_000).optional(),
  lon: z.number().min(-180).max(180).optional(),
  lat: z.number().min(-90).max(90).optional(),
};

/** A test pit: where, when, how it was dug, how deep and what was found. */
export const testPitSchema = z.intersection(pointAnchorSchema, pitFields);
export const testPitPatchSchema = pitFields.partial().extend(moveFields);

const crossingFields = z.object({
  pitId: z.uuid('Pick a test pit of this project, or none.').nullable().optional(),
  utilityKindId: z.uuid('Pick the kind of utility.'),
  owner: z.string().trim().max(200, 'Keep the owner under 200 characters.').optional(),
  depthM: metres('The depth to the top of the utility', 0, 20).nullable().optional(),
  clearanceM: metres('The clearance', 0, 20).nullable().optional(),
  method: z.enum(CROSSING_METHODS, 'Pick how it was found: radar, test pit, records or otherwise.'),
  foundOn: plausibleDate('the day found').nullable().optional(),
  note: z.string().trim().max(2000, 'Keep the note under 2000 characters.').optional(),
});

/** A utility found by radar, in a pit or from records: its kind, owner, depth, clearance to our ducts. */
export const utilityCrossingSchema = z.intersection(pointAnchorSchema, crossingFields);
export const utilityCrossingPatchSchema = crossingFields.partial().extend(moveFields);

export const pitsFromUploadSchema = z.object({
  code: z.string().trim().min(1, 'Give the code that marks a pit, e.g. PIT.').max(60),
  method: z.enum(PIT_METHODS).default('hand_dug'),
});

