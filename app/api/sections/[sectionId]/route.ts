import { withRoute } from '@/lib/api/with-route';
import { bySectionParam } from '@/lib/api/scopes';
import { sectionDetail } from '@/lib/services/reconcile';

// One section with its planned route, matched observations, sources, neighbours and corrections.
export const GET = withRoute({ action: 'section.read', scope: bySectionParam }, async ({ db, params }) => sectionDetail(db, params.sectionId));
