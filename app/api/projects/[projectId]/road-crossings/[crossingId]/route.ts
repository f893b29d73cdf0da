import { withRoute } from '@/lib/api/with-route';
import { byProjectRecord } from '@/lib/api/scopes';
import { roadCrossingPatchSchema } from '@/lib/records/road-crossing-schema';
import { editRoadCrossing, removeRoadCrossing } from '@/lib/services/road-crossings';

const scope = byProjectRecord('road_crossings', 'crossingId');

export const PATCH = withRoute({ action: 'record.write', scope, side: 'contractor', body: roadCrossingPatchSchema }, async ({ db, principal, project, params, body }) => ({
  crossing: await editRoadCrossing(db, principal, project, params.crossingId, body),
}));

export const DELETE = withRoute({ action: 'record.write', scope, side: 'contractor' }, async ({ db, principal, project, params }) => {
  await removeRoadCrossing(db, principal, project, params.crossingId);
  return { removed: params.crossingId };
});
