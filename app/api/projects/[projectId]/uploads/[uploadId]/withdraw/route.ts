import { z } from 'zod';
import { withRoute } from '@/lib/api/with-route';
import { byUploadParam } from '@/lib/api/scopes';
import { publicUpload, withdrawUpload } from '@/lib/services/uploads';

export const POST = withRoute(
  { action: 'upload.manage', scope: byUploadParam, body: z.object({ reason: z.string().trim().min(3, 'Say why the upload is withdrawn.').max(500) }) },
  async ({ db, principal, project, params, body }) => ({ upload: publicUpload(await withdrawUpload(db, principal, project, params.uploadId, body.reason)) }),
);
