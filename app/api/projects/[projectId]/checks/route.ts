import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { projectChecks } from '@/lib/services/quality-checks';

// Every quality check of the project with its count and the offending records, computed now.
export const GET = withRoute({ action: 'check.read', scope: byProjectParam }, async ({ db, project }) => projectChecks(db, project));
