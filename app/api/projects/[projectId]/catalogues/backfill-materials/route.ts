import { NextResponse } from 'next/server';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { backfillMaterialSchema } from '@/lib/records/catalogue-schemas';
import { addBackfillMaterial } from '@/lib/services/catalogues';

export const POST = withRoute({ action: 'catalogue.manage', scope: byProjectParam, side: 'contractor', body: backfillMaterialSchema }, async ({ db, principal, project, body }) =>
  NextResponse.json({ backfillMaterial: await addBackfillMaterial(db, principal, project, body) }, { status: 201 }),
);
