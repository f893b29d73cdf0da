import { byProjectRecord } from '@/lib/api/scopes';
import { withRoute } from '@/lib/api/with-route';
import { ductSizePatchSchema } from '@/lib/records/catalogue-schemas';
import { changeDuctSize } from '@/lib/services/catalogues';

export const PATCH = withRoute({ action: 'catalogue.manage', scope: byProjectRecord('duct_sizes', 'sizeId'), side: 'contractor', body: ductSizePatchSchema }, async ({ db, principal, project, params, body }) => ({
  ductSize: await changeDuctSize(db, principal, project, params.sizeId, body),
}));
