import { withRoute } from '@/lib/api/with-route';
import { byProjectRecord } from '@/lib/api/scopes';
import { withdrawProductionCorrection } from '@/lib/services/production';

export const DELETE = withRoute({ action: 'record.write', scope: byProjectRecord('production_corrections', 'correctionId'), side: 'contractor' }, async ({ db, principal, project, params }) => {
  await withdrawProductionCorrection(db, principal, project, params.correctionId);
  return { removed: params.correctionId };
});
