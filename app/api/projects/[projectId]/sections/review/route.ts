import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { bulkReviewSchema, reviewSections } from '@/lib/services/reconcile';

// Many sections take one decision at once: one transaction, one audit entry per section.
export const POST = withRoute({ action: 'section.review', scope: byProjectParam, body: bulkReviewSchema }, async ({ db, principal, project, body }) =>
  reviewSections(db, principal, project.id, body),
);
