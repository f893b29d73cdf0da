import { withRoute } from '@/lib/api/with-route';
import { byUploadParam } from '@/lib/api/scopes';
import { depthFromUploadSchema, depthReadingsFromUpload } from '@/lib/services/depth-readings';

// Depth readings from the points and vertices of an upload that carry the named attribute ({ attribute: "depth" }).
export const POST = withRoute({ action: 'record.write', scope: byUploadParam, side: 'contractor', body: depthFromUploadSchema }, async ({ db, principal, project, params, body }) =>
  Response.json(await depthReadingsFromUpload(db, principal, project, params.uploadId, body), { status: 201 }),
);
