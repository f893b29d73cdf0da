import { z } from 'zod';
import { withRoute } from '@/lib/api/with-route';
import { byUploadParam } from '@/lib/api/scopes';
import { getUpload, listUploadExclusions, listUploadFiles, uploadFeatureCollection } from '@/db/uploads';
import { publicUpload, setUploadAccuracy, uploadAccuracySchema } from '@/lib/services/uploads';
import { reconcileAfterUpload } from '@/lib/services/reconcile';

export const GET = withRoute(
  { action: 'upload.read', scope: byUploadParam, query: z.object({ geometry: z.enum(['geojson']).optional() }) },
  async ({ db, params, query }) => {
    const upload = (await getUpload(db, params.uploadId))!;
    const files = (await listUploadFiles(db, upload.id)).map((f) => ({ fileName: f.fileName, sha256: f.sha256, sizeBytes: f.sizeBytes }));
    const body: Record<string, unknown> = { upload: { ...publicUpload(upload), files, exclusions: await listUploadExclusions(db, upload.id) } };
    if (query.geometry === 'geojson') body.geometry = await uploadFeatureCollection(db, upload.id);
    return body;
  },
);

// The upload's accuracy class, set afterwards by the contractor's people; the project is reconciled again.
export const PATCH = withRoute({ action: 'upload.manage', scope: byUploadParam, side: 'contractor', body: uploadAccuracySchema }, async ({ db, principal, project, params, body }) => {
  const { upload, changed } = await setUploadAccuracy(db, principal, project, params.uploadId, body);
  if (changed && upload.status === 'stored') await reconcileAfterUpload(db, project.id, principal.id);
  return { upload: publicUpload(upload), reconciling: changed && upload.status === 'stored' };
});
