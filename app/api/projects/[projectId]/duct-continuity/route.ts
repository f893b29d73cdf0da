import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { ductContinuity } from '@/lib/services/duct-bundles';

// Per route: continuity breaks, joints and connectors counted, each installed stretch against the plan.
export const GET = withRoute({ action: 'record.read', scope: byProjectParam }, async ({ db, project }) => ({ routes: await ductContinuity(db, project.id) }));
