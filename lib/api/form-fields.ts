import { z } from 'zod';

/** A multipart field that carries JSON, validated by `schema`: `jsonField(mapSchema, '{"id":"pt"}')`. */
export const jsonField = <T extends z.ZodType>(schema: T, example: string) =>
  z
    .string()
    .transform((s, ctx) => {
      try {
        return JSON.parse(s) as unknown;
      } catch {
        ctx.addIssue({ code: 'custom', message: `must be JSON, e.g. ${example}` });
        return z.NEVER;
      }
    })
    .pipe(schema);

/** An EPSG code as people write it, normalised: ' epsg:25833' → 'EPSG:25833', '25833' → 'EPSG:25833'. */
export const epsgField = z
  .string()
  .trim()
  .regex(/^(EPSG:)?\d{4,6}$/i, 'Give the EPSG number of the coordinate system, e.g. 25833 or EPSG:25833.')
  .transform((s) => `EPSG:${s.replace(/^EPSG:/i, '')}`);
