import { withRoute } from '@/lib/api/with-route';
import { byProjectRecord } from '@/lib/api/scopes';
import { editTestPit, removeTestPit, testPitPatchSchema } from '@/lib/services/test-pits';

const scope = byProjectRecord('test_pits', 'pitId');

export const PATCH = withRoute({ action: 'record.write', scope, side: 'contractor', body: testPitPatchSchema }, async ({ db, principal, project, params, body }) => ({
  pit: await editTestPit(db, principal, project, params.pitId, body),
}));

export const DELETE = withRoute({ action: 'record.write', scope, side: 'contractor' }, async ({ db, principal, project, params }) => {
  await removeTestPit(db, principal, project, params.pitId);
  return { removed: params.pitId };
});
