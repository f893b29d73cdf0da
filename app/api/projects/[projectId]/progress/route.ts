import { listProgress } from '@/db/households';
import { byProjectParam, withRoute } from '@/lib/api/with-route';

// GET: the daily series of addresses, households, passed and connected (one row a day, the project's calendar)
export const GET = withRoute({ action: 'address.read', scope: byProjectParam }, async ({ db, project }) => ({
  progress: await listProgress(db, project.id),
}));
