import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { projectCatalogues } from '@/lib/services/catalogues';

export const GET = withRoute({ action: 'record.read', scope: byProjectParam }, async ({ db, project }) => projectCatalogues(db, project));
