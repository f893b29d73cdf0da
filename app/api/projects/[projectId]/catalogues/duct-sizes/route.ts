import { NextResponse } from 'next/server';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { ductSizeSchema } from '@/lib/records/catalogue-schemas';
import { addDuctSize } from '@/lib/services/catalogues';

export const POST = withRoute({ action: 'catalogue.manage', scope: byProjectParam, side: 'contractor', body: ductSizeSchema }, async ({ db, principal, project, body }) =>
  NextResponse.json({ ductSize: await addDuctSize(db, principal, project, body) }, { status: 201 }),
);
