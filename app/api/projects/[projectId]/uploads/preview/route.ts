import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { receiveMultipart } from '@/lib/api/multipart';
import { env } from '@/lib/env';
import { previewUpload } from '@/lib/services/uploads';

// Parse and report, store nothing: the column-mapping and CRS step before an upload.
export const POST = withRoute({ action: 'upload.create', scope: byProjectParam }, async ({ req, db, project }) => {
  const form = await receiveMultipart(req, env().UPLOAD_MAX_BYTES);
  try {
    return { preview: await previewUpload(db, project, form) };
  } finally {
    await form.cleanup();
  }
});
