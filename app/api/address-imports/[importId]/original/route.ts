import { Readable } from 'node:stream';
import contentDisposition from 'content-disposition';
import { withRoute } from '@/lib/api/with-route';
import { AppError } from '@/lib/api/errors';
import { byAddressImportParam } from '@/lib/api/scopes';
import { getAddressImport } from '@/db/address-imports';
import { originalsStore } from '@/lib/storage/originals-store';

// The address register file as it was imported, byte for byte.
export const GET = withRoute({ action: 'address.read', scope: byAddressImportParam }, async ({ db, params }) => {
  const imp = (await getAddressImport(db, params.importId))!;
  const size = await originalsStore().size(imp.storageKey);
  if (size === undefined) throw new AppError('not_found', 'The original file is missing from storage.');
  return new Response(Readable.toWeb(originalsStore().get(imp.storageKey)) as ReadableStream, {
    headers: {
      'content-type': 'application/octet-stream',
      'content-length': String(size),
      'content-disposition': contentDisposition(imp.fileName),
      'x-content-sha256': imp.sha256,
    },
  });
});
