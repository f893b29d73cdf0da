import { byProjectRecord } from '@/lib/api/scopes';
import { withRoute } from '@/lib/api/with-route';
import { utilityKindPatchSchema } from '@/lib/records/catalogue-schemas';
import { changeUtilityKind } from '@/lib/services/catalogues';

export const PATCH = withRoute({ action: 'catalogue.manage', scope: byProjectRecord('utility_kinds', 'kindId'), side: 'contractor', body: utilityKindPatchSchema }, async ({ db, principal, project, params, body }) => ({
  utilityKind: await changeUtilityKind(db, principal, project, params.kindId, body),
}));
