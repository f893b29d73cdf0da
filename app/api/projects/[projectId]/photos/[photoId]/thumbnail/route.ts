import { z } from 'zod';
import { withRoute } from '@/lib/api/with-route';
import { byProjectRecord } from '@/lib/api/scopes';
import { photoFileResponse } from '@/lib/services/photo-files';

export const GET = withRoute(
  { action: 'record.read', scope: byProjectRecord('photos', 'photoId'), query: z.object({ download: z.enum(['0', '1']).optional() }) },
  async ({ db, params, query }) => photoFileResponse(db, params.photoId, 'thumbnail', query.download === '1'),
);
