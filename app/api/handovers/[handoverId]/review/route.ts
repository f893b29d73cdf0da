import { byHandoverParam } from '@/lib/api/scopes';
import { withRoute } from '@/lib/api/with-route';
import { reviewHandover, reviewSchema } from '@/lib/services/handover-reviews';

// The network owner accepts an issued package, or returns it with comments (per section or general).
export const POST = withRoute({ action: 'handover.review', scope: byHandoverParam, side: 'owner', body: reviewSchema }, async ({ db, principal, project, params, body }) => ({
  handover: await reviewHandover(db, principal, project, params.handoverId, body),
}));
