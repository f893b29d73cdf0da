import contentDisposition from 'content-disposition';
import { Readable } from 'node:stream';
import { AppError } from '@/lib/api/errors';
import { byHandoverParam } from '@/lib/api/scopes';
import { withRoute } from '@/lib/api/with-route';
import { parseRange } from '@/lib/handover/range';
import { downloadable } from '@/lib/services/handovers';
import { originalsStore } from '@/lib/storage/originals-store';

// The ZIP of an issued (accepted, returned) package, streamed; resumable with a single byte range (RFC 9110 §14).
export const GET = withRoute({ action: 'handover.read', scope: byHandoverParam }, async ({ db, params, req }) => {
  const h = await downloadable(db, params.handoverId);
  const size = await originalsStore().size(h.storage_key);
  if (size === undefined) throw new AppError('not_found', 'The package file is no longer stored.');
  const headers: Record<string, string> = {
    'content-type': 'application/zip',
    'content-disposition': contentDisposition(h.file_name ?? `handover-r${h.revision}.zip`),
    'accept-ranges': 'bytes',
    etag: `"${h.sha256}"`,
  };
  const header = req.headers.get('range');
  const ifRange = req.headers.get('if-range');
  const range = header && (!ifRange || ifRange === headers.etag) ? parseRange(header, size) : null;
  if (range === 'unsatisfiable') {
    const err = new AppError('range_not_satisfiable', `The range ${header} lies outside the file of ${size} bytes.`);
    return new Response(JSON.stringify({ error: { code: err.code, message: err.message } }), { status: 416, headers: { 'content-type': 'application/json', 'content-range': `bytes */${size}`, 'accept-ranges': 'bytes' } });
  }
  if (range) {
    return new Response(Readable.toWeb(originalsStore().get(h.storage_key, range)) as ReadableStream, {
      status: 206, headers: { ...headers, 'content-length': String(range.end - range.start + 1), 'content-range': `bytes ${range.start}-${range.end}/${size}` },
    });
  }
  return new Response(Readable.toWeb(originalsStore().get(h.storage_key)) as ReadableStream, { headers: { ...headers, 'content-length': String(size) } });
});
