import { NextResponse } from 'next/server';
import { z } from 'zod';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { receiveMultipart } from '@/lib/api/multipart';
import { listPhotos } from '@/db/photos';
import { PHOTO_MAX_BYTES } from '@/lib/records/photo-schema';
import { receivePhoto } from '@/lib/services/photos';

const listQuery = z.object({
  crossingId: z.uuid('crossingId must be the id of a road crossing.').optional(),
  pitId: z.uuid('pitId must be the id of a test pit.').optional(),
  routeId: z.uuid('routeId must be the id of a route.').optional(),
});

export const GET = withRoute({ action: 'record.read', scope: byProjectParam, query: listQuery }, async ({ db, project, query }) => ({
  photos: await listPhotos(db, project.id, query),
}));

// One photo a request, multipart: `file` and the optional fields caption, lon, lat, routeId, chainageM, crossingId, pitId.
export const POST = withRoute({ action: 'record.write', scope: byProjectParam, side: 'contractor' }, async ({ req, db, principal, project }) => {
  // a little room for the form's other fields
  const form = await receiveMultipart(req, PHOTO_MAX_BYTES + 64 * 1024);
  try {
    const { photo, created } = await receivePhoto(db, principal, project, form);
    return NextResponse.json({ photo }, { status: created ? 201 : 200 });
  } finally {
    await form.cleanup();
  }
});
