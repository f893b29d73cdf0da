import { NextResponse } from 'next/server';
import { listDuctBundles } from '@/db/duct-bundles';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { ductBundleSchema, ductBundlesQuerySchema } from '@/lib/records/duct-schemas';
import { createDuctBundle } from '@/lib/services/duct-bundles';

// The project's duct bundles (planned and installed), by route and chainage; ?routeId= and ?kind= narrow.
export const GET = withRoute({ action: 'record.read', scope: byProjectParam, query: ductBundlesQuerySchema }, async ({ db, project, query }) => ({
  bundles: await listDuctBundles(db, project.id, query),
}));

export const POST = withRoute({ action: 'record.write', scope: byProjectParam, side: 'contractor', body: ductBundleSchema }, async ({ db, principal, project, body }) => {
  const bundle = await createDuctBundle(db, principal, project, body);
  return NextResponse.json({ bundle }, { status: 201 });
});
