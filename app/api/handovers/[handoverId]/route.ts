import { byHandoverParam } from '@/lib/api/scopes';
import { withRoute } from '@/lib/api/with-route';
import { handoverStatus } from '@/lib/services/handovers';

// One handover package: status, build progress, manifest and change report.
export const GET = withRoute({ action: 'handover.read', scope: byHandoverParam }, async ({ db, params }) => handoverStatus(db, params.handoverId));
