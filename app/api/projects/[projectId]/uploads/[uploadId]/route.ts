import { z } from 'zod';
import { withRoute } from '@/lib/api/with-route';
import { byUploadParam } from '@/lib/api/scopes';
import { getUpload, listUploadExclusions, listUploadFiles, uploadFeatureCollection } from '@/db/uploads';
import { publicUpload } from '@/lib/services/uploads';

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
