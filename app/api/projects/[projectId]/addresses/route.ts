import { NextResponse } from 'next/server';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { receiveMultipart } from '@/lib/api/multipart';
import { env } from '@/lib/env';
import { importAddresses } from '@/lib/services/address-import';

// POST: imports the address register (CSV, GeoJSON points, zipped shapefile of points); dryRun=true returns
// the preview (mapping, counts, row errors) and stores nothing; partial=true only adds and updates.
export const POST = withRoute({ action: 'address.import', scope: byProjectParam }, async ({ req, db, principal, project }) => {
  const form = await receiveMultipart(req, env().UPLOAD_MAX_BYTES);
  try {
    const result = await importAddresses(db, principal, project, form);
    return NextResponse.json(result, { status: result.dryRun ? 200 : 201 });
  } finally {
    await form.cleanup();
  }
});
