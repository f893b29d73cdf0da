import { PassThrough, Readable } from 'node:stream';
import { NextResponse } from 'next/server';
import { listAddresses } from '@/db/addresses';
import { AppError } from '@/lib/api/errors';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { receiveMultipart } from '@/lib/api/multipart';
import { env } from '@/lib/env';
import { importAddresses } from '@/lib/services/address-import';
import { addressesCsv, addressesGeoJson, writeAddressesWorkbook } from '@/lib/services/address-export';

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

const STATUSES = ['passed', 'not_passed', 'connected'] as const;
const FORMATS = ['json', 'geojson', 'csv', 'xlsx'] as const;
function pick<T extends string>(name: string, value: string | null, allowed: readonly T[]): T | undefined {
  if (value === null || value === '') return undefined;
  if ((allowed as readonly string[]).includes(value)) return value as T;
  throw new AppError('bad_parameter', `${name} must be one of ${allowed.join(', ')} (got "${value.slice(0, 40)}").`, [{ path: name, message: `one of ${allowed.join(', ')}` }]);
}

// GET: the register's current addresses, optionally by status, as JSON, GeoJSON, CSV or an Excel workbook
export const GET = withRoute({ action: 'address.read', scope: byProjectParam }, async ({ req, db, project }) => {
  const sp = req.nextUrl.searchParams;
  const status = pick('status', sp.get('status'), STATUSES);
  const format = pick('format', sp.get('format'), FORMATS) ?? 'json';
  const addresses = await listAddresses(db, project.id, { status });
  const name = `addresses${status ? `-${status.replace('_', '-')}` : ''}`;
  if (format === 'geojson') {
    return new NextResponse(JSON.stringify(addressesGeoJson(addresses)), { headers: { 'content-type': 'application/geo+json', 'content-disposition': `attachment; filename="${name}.geojson"` } });
  }
  if (format === 'csv') {
    return new NextResponse(addressesCsv(addresses), { headers: { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': `attachment; filename="${name}.csv"` } });
  }
  if (format === 'xlsx') {
    const out = new PassThrough();
    void writeAddressesWorkbook(addresses, project.name, out).catch((err) => out.destroy(err));
    return new NextResponse(Readable.toWeb(out) as ReadableStream, {
      headers: { 'content-type': 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', 'content-disposition': `attachment; filename="${name}.xlsx"` },
    });
  }
  return { addresses };
});
