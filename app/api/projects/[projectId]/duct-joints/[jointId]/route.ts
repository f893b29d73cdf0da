import { byProjectRecord } from '@/lib/api/scopes';
import { withRoute } from '@/lib/api/with-route';
import { deleteDuctJointRecord } from '@/lib/services/duct-bundles';

export const DELETE = withRoute({ action: 'record.write', scope: byProjectRecord('duct_joints', 'jointId'), side: 'contractor' }, async ({ db, principal, project, params }) => {
  await deleteDuctJointRecord(db, principal, project, params.jointId);
  return { removed: params.jointId };
});
