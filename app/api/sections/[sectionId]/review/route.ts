import { withRoute } from '@/lib/api/with-route';
import { bySectionParam } from '@/lib/api/scopes';
import { reviewSchema, reviewSection, sectionFeature } from '@/lib/services/reconcile';

export const POST = withRoute({ action: 'section.review', scope: bySectionParam, body: reviewSchema }, async ({ db, principal, params, body }) => {
  const s = await reviewSection(db, principal, params.sectionId, body);
  const f = sectionFeature(s);
  return { section: { id: f.id, ...f.properties, reviewComment: s.reviewComment } };
});
