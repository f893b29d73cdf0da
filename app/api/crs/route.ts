import { z } from 'zod';
import { withRoute } from '@/lib/api/with-route';
import { searchCrs } from '@/db/crs';

export const GET = withRoute(
  { action: 'crs.read', query: z.object({ q: z.string().trim().min(1, 'Type an EPSG code or words of the name.').max(100) }) },
  async ({ db, query }) => ({ results: await searchCrs(db, query.q) }),
);
