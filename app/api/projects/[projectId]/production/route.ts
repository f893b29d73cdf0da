import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { productionRangeSchema } from '@/lib/records/production';
import { projectProduction } from '@/lib/services/production';

// Daily production per crew and day (`?from=&to=`, days on the project's clock), derived and corrected.
export const GET = withRoute({ action: 'record.read', scope: byProjectParam, query: productionRangeSchema }, async ({ db, project, query }) => ({
  timeZone: project.timeZone,
  days: await projectProduction(db, project, query),
}));
