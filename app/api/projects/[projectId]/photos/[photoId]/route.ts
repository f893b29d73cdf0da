import { withRoute } from '@/lib/api/with-route';
import { byProjectRecord } from '@/lib/api/scopes';
import { getPhoto } from '@/db/photos';
import { photoPatchSchema } from '@/lib/records/photo-schema';
import { editPhoto, removePhoto } from '@/lib/services/photos';

const scope = byProjectRecord('photos', 'photoId');

export const GET = withRoute({ action: 'record.read', scope }, async ({ db, params }) => ({ photo: await getPhoto(db, params.photoId) }));

export const PATCH = withRoute({ action: 'record.write', scope, side: 'contractor', body: photoPatchSchema }, async ({ db, principal, project, params, body }) => ({
  photo: await editPhoto(db, principal, project, params.photoId, body),
}));

export const DELETE = withRoute({ action: 'record.write', scope, side: 'contractor' }, async ({ db, principal, project, params }) => {
  await removePhoto(db, principal, project, params.photoId);
  return { removed: params.photoId };
});
