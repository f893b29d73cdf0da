import { withRoute } from '@/lib/api/with-route';
import { byProjectRecord } from '@/lib/api/scopes';
import { restorationPatchSchema } from '@/lib/records/restoration-schema';
import { editRestoration, removeRestoration } from '@/lib/services/restorations';

const scope = byProjectRecord('restorations', 'restorationId');

export const PATCH = withRoute({ action: 'record.write', scope, side: 'contractor', body: restorationPatchSchema }, async ({ db, principal, project, params, body }) => ({
  restoration: await editRestoration(db, principal, project, params.restorationId, body),
}));

export const DELETE = withRoute({ action: 'record.write', scope, side: 'contractor' }, async ({ db, principal, project, params }) => {
  await removeRestoration(db, principal, project, params.restorationId);
  return { removed: params.restorationId };
});
