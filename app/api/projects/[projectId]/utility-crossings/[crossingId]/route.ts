import { withRoute } from '@/lib/api/with-route';
import { byProjectRecord } from '@/lib/api/scopes';
import { editUtilityCrossing, removeUtilityCrossing, utilityCrossingPatchSchema } from '@/lib/services/test-pits';

const scope = byProjectRecord('utility_crossings', 'crossingId');

export const PATCH = withRoute({ action: 'record.write', scope, side: 'contractor', body: utilityCrossingPatchSchema }, async ({ db, principal, project, params, body }) =>
  editUtilityCrossing(db, principal, project, params.crossingId, body),
);

export const DELETE = withRoute({ action: 'record.write', scope, side: 'contractor' }, async ({ db, principal, project, params }) => {
  await removeUtilityCrossing(db, principal, project, params.crossingId);
  return { removed: params.crossingId };
});
