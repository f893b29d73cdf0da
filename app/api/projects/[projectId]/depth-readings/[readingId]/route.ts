import { withRoute } from '@/lib/api/with-route';
import { byProjectRecord } from '@/lib/api/scopes';
import { coverCompliance } from '@/lib/records/depth-compliance';
import { depthReadingPatchSchema, editDepthReading, removeDepthReading } from '@/lib/services/depth-readings';

const scope = byProjectRecord('depth_readings', 'readingId');

export const PATCH = withRoute({ action: 'record.write', scope, side: 'contractor', body: depthReadingPatchSchema }, async ({ db, principal, project, params, body }) => {
  const reading = await editDepthReading(db, principal, project, params.readingId, body);
  return { reading: { ...reading, compliance: coverCompliance(reading.coverM, project.minCoverDepthM) } };
});

export const DELETE = withRoute({ action: 'record.write', scope, side: 'contractor' }, async ({ db, principal, project, params }) => {
  await removeDepthReading(db, principal, project, params.readingId);
  return { removed: params.readingId };
});
