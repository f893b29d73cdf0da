import { NextResponse } from 'next/server';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { receiveMultipart } from '@/lib/api/multipart';
import { env } from '@/lib/env';
import { listUploads } from '@/db/uploads';
import { publicUpload, receiveUpload } from '@/lib/services/uploads';
import { reconcileAfterUpload } from '@/lib/services/reconcile';

export const GET = withRoute({ action: 'upload.read', scope: byProjectParam }, async ({ db, project }) => ({
  uploads: (await listUploads(db, project.id)).map(publicUpload),
}));

export const POST = withRoute({ action: 'upload.create', scope: byProjectParam }, async ({ req, db, principal, project }) => {
  const form = await receiveMultipart(req, env().UPLOAD_MAX_BYTES);
  try {
    const { upload, created } = await receiveUpload(db, principal, project, form);
    if (created) await reconcileAfterUpload(db, project.id, principal.id);
    return NextResponse.json({ upload: publicUpload(upload) }, { status: created ? 201 : 200 });
  } finally {
    await form.cleanup();
  }
});
