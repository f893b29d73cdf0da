import { withRoute } from '@/lib/api/with-route';
import { byUploadParam } from '@/lib/api/scopes';
import { publicUpload, retrySettingsSchema, retryUpload } from '@/lib/services/uploads';

export const POST = withRoute(
  { action: 'upload.manage', scope: byUploadParam, body: retrySettingsSchema },
  async ({ db, principal, project, params, body }) => ({ upload: publicUpload((await retryUpload(db, principal, project, params.uploadId, body)).upload) }),
);
