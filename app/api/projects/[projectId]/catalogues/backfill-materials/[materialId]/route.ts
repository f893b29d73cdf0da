import { byProjectRecord } from '@/lib/api/scopes';
import { withRoute } from '@/lib/api/with-route';
import { backfillMaterialPatchSchema } from '@/lib/records/catalogue-schemas';
import { changeBackfillMaterial } from '@/lib/services/catalogues';

export const PATCH = withRoute({ action: 'catalogue.manage', scope: byProjectRecord('backfill_materials', 'materialId'), side: 'contractor', body: backfillMaterialPatchSchema }, async ({ db, principal, project, params, body }) => ({
  backfillMaterial: await changeBackfillMaterial(db, principal, project, params.materialId, body),
}));
