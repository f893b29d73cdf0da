import { withRoute } from '@/lib/api/with-route';
import { byUploadParam } from '@/lib/api/scopes';
import { pitsFromUploadSchema, testPitsFromUpload } from '@/lib/services/test-pits';

// Test pits from an upload's GPX waypoints or survey points marked by a code ({ code: "PIT" }).
export const POST = withRoute({ action: 'record.write', scope: byUploadParam, side: 'contractor', body: pitsFromUploadSchema }, async ({ db, principal, project, params, body }) =>
  Response.json(await testPitsFromUpload(db, principal, project, params.uploadId, body), { status: 201 }),
);
