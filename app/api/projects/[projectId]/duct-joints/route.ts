import { NextResponse } from 'next/server';
import { listDuctJoints } from '@/db/duct-bundles';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { ductJointSchema } from '@/lib/records/duct-schemas';
import { createDuctJoint } from '@/lib/services/duct-bundles';

export const GET = withRoute({ action: 'record.read', scope: byProjectParam }, async ({ db, project }) => ({ joints: await listDuctJoints(db, project.id) }));

export const POST = withRoute({ action: 'record.write', scope: byProjectParam, side: 'contractor', body: ductJointSchema }, async ({ db, principal, project, body }) => {
  const joint = await createDuctJoint(db, principal, project, body);
  return NextResponse.json({ joint }, { status: 201 });
});
