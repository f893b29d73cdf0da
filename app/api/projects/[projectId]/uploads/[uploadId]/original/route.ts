import { Readable } from 'node:stream';
import contentDisposition from 'content-disposition';
import { z } from 'zod';
import { withRoute } from '@/lib/api/with-route';
import { byUploadParam } from '@/lib/api/scopes';
import { AppError } from '@/lib/api/errors';
import { listUploadFiles } from '@/db/uploads';
import { originalsStore } from '@/lib/storage/originals-store';

// The original bytes, unchanged; `?part=N` picks one file of a multi-file set (loose shapefile parts).
export const GET = withRoute(
  { action: 'upload.read', scope: byUploadParam, query: z.object({ part: z.coerce.number().int().min(0).default(0) }) },
  async ({ db, params, query }) => {
    const files = await listUploadFiles(db, params.uploadId);
    const f = files[query.part];
    if (!f) throw new AppError('not_found', `This upload has ${files.length} file(s); part ${query.part} does not exist.`);
    const size = await originalsStore().size(f.storageKey);
    if (size === undefined) throw new AppError('not_found', 'The original file is missing from storage.');
    return new Response(Readable.toWeb(originalsStore().get(f.storageKey)) as ReadableStream, {
      headers: {
        'content-type': 'application/octet-stream',
        'content-length': String(size),
        // RFC 6266: an ASCII fallback and the UTF-8 name (Straße.gpx, emoji) in filename*
        'content-disposition': contentDisposition(f.fileName),
        'x-content-sha256': f.sha256,
      },
    });
  },
);
