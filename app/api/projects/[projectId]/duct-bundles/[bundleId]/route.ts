import { getDuctBundle } from '@/db/duct-bundles';
import { byProjectRecord } from '@/lib/api/scopes';
import { withRoute } from '@/lib/api/with-route';
import { ductBundleSchema } from '@/lib/records/duct-schemas';
import { deleteDuctBundleRecord, updateDuctBundleRecord } from '@/lib/services/duct-bundles';

const scope = byProjectRecord('duct_bundles', 'bundleId');

export const GET = withRoute({ action: 'record.read', scope }, async ({ db, params }) => ({ bundle: await getDuctBundle(db, params.bundleId) }));

// the whole installed bundle again (stretch, ducts, flags); planned bundles come from the plan (409)
export const PATCH = withRoute({ action: 'record.write', scope, side: 'contractor', body: ductBundleSchema }, async ({ db, principal, project, params, body }) => ({
  bundle: await updateDuctBundleRecord(db, principal, project, params.bundleId, body),
}));

export const DELETE = withRoute({ action: 'record.write', scope, side: 'contractor' }, async ({ db, principal, project, params }) => {
  await deleteDuctBundleRecord(db, principal, project, params.bundleId);
  return { removed: params.bundleId };
});
