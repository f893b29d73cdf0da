import { NextResponse } from 'next/server';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { utilityKindSchema } from '@/lib/records/catalogue-schemas';
import { addUtilityKind } from '@/lib/services/catalogues';

export const POST = withRoute({ action: 'catalogue.manage', scope: byProjectParam, side: 'contractor', body: utilityKindSchema }, async ({ db, principal, project, body }) =>
  NextResponse.json({ utilityKind: await addUtilityKind(db, principal, project, body) }, { status: 201 }),
);
