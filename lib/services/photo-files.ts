import { Readable } from 'node:stream';
import contentDisposition from 'content-disposition';
import type { Db } from '@/db/client';
import { getPhotoFiles } from '@/db/photos';
import { AppError } from '@/lib/api/errors';
import { originalsStore } from '@/lib/storage/originals-store';

/**
 * A photo's file as a response: the original byte for byte (its SHA-256 in a header, its name kept), or
 * the thumbnail. Served as an image, never sniffed by the browser as anything else.
 */
export async function photoFileResponse(db: Db, photoId: string, which: 'original' | 'thumbnail', download: boolean): Promise<Response> {
  const f = await getPhotoFiles(db, photoId);
  if (!f) throw new AppError('not_found', 'No such photo.');
  const key = which === 'original' ? f.storageKey : f.thumbnailKey;
  const size = await originalsStore().size(key);
  if (size === undefined) throw new AppError('not_found', `The photo's ${which} is missing from storage.`);
  const headers: Record<string, string> = {
    'content-type': which === 'original' ? f.mimeType : 'image/jpeg',
    'content-length': String(size),
    'x-content-type-options': 'nosniff',
    'cache-control': 'private, max-age=3600',
  };
  if (which === 'original') {
    headers['x-content-sha256'] = f.sha256;
    // RFC 6266: an ASCII fallback and the UTF-8 name in filename*
    headers['content-disposition'] = contentDisposition(f.fileName, { type: download ? 'attachment' : 'inline' });
  }
  return new Response(Readable.toWeb(originalsStore().get(key)) as ReadableStream, { headers });
}
