import type { NextRequest } from 'next/server';
import type { z } from 'zod';
import { AppError } from './errors';

/** The query parsed with the schema; a bad value is a 400 `bad_parameter` naming the parameter and why. */
export function lookupParams<S extends z.ZodType>(req: NextRequest, schema: S): z.infer<S> {
  const r = schema.safeParse(Object.fromEntries(req.nextUrl.searchParams.entries()));
  if (r.success) return r.data;
  const i = r.error.issues[0];
  throw new AppError('bad_parameter', `${i.path.join('.') || 'query'}: ${i.message}`, r.error.issues.map((x) => ({ path: x.path.join('.'), message: x.message })));
}
