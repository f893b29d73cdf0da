import { z } from 'zod';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { receiveMultipart } from '@/lib/api/multipart';
import { env } from '@/lib/env';
import { importDepthCsv } from '@/lib/services/depth-readings';

// A CSV of depth readings (multipart, part "file"; fields crs, columns, confirm). `?preview=1` or no
// confirm field: the mapping and the failing rows, nothing stored. confirm=1: every reading in one
// transaction, or none (422 with the failing rows).
export const POST = withRoute({ action: 'record.write', scope: byProjectParam, side: 'contractor', query: z.object({ preview: z.enum(['1', 'true']).optional() }) }, async ({ req, db, principal, project, query }) => {
  const form = await receiveMultipart(req, env().UPLOAD_MAX_BYTES);
  try {
    const result = await importDepthCsv(db, principal, project, form, { preview: query.preview !== undefined });
    return result.stored !== undefined ? Response.json({ import: result }, { status: 201 }) : { preview: result };
  } finally {
    await form.cleanup();
  }
});
