import { NextResponse } from 'next/server';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { orgChangesOf, proposeOrgChange, proposeOrgChangeSchema } from '@/lib/services/org-changes';

export const GET = withRoute({ action: 'project.read', scope: byProjectParam }, async ({ db, project }) => ({
  changes: await orgChangesOf(db, project.id),
}));

export const POST = withRoute({ action: 'project.manage', scope: byProjectParam, body: proposeOrgChangeSchema }, async ({ db, principal, project, body }) =>
  NextResponse.json({ change: await proposeOrgChange(db, principal, project, body) }, { status: 201 }),
);
