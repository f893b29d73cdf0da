import { NextResponse } from 'next/server';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { productionCorrectionSchema } from '@/lib/records/production';
import { correctProduction } from '@/lib/services/production';

export const POST = withRoute({ action: 'record.write', scope: byProjectParam, side: 'contractor', body: productionCorrectionSchema }, async ({ db, principal, project, body }) => {
  const correction = await correctProduction(db, principal, project, body);
  return NextResponse.json({ correction }, { status: 201 });
});
