import { NextResponse } from 'next/server';
import { withRoute } from '@/lib/api/with-route';
import { listProjectsForOrganisation } from '@/db/projects';
import { createProject, createProjectSchema } from '@/lib/services/projects';

export const GET = withRoute({ action: 'project.read' }, async ({ db, principal }) => ({
  projects: await listProjectsForOrganisation(db, principal.organisationId),
}));

export const POST = withRoute({ action: 'project.manage', body: createProjectSchema }, async ({ db, principal, body }) =>
  NextResponse.json({ project: await createProject(db, principal, body) }, { status: 201 }),
);
