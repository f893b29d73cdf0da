import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { refreshPlannedBundlesFor } from '@/lib/services/duct-bundles';

// Derive the planned bundles again from the current plan's ducts attribute (one per route, its whole length).
export const POST = withRoute({ action: 'record.write', scope: byProjectParam, side: 'contractor' }, async ({ db, principal, project }) => ({
  planned: await refreshPlannedBundlesFor(db, principal, project),
}));
