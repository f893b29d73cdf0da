import { NextResponse } from 'next/server';
import { z } from 'zod';
import { withRoute } from '@/lib/api/with-route';
import { listOrganisations } from '@/db/organisations';
import { ORG_KINDS } from '@/lib/auth/roles';
import { registerOrganisation, registerOrganisationSchema } from '@/lib/services/organisations';

// names and kinds only: what an admin needs to pick a project's partner
export const GET = withRoute({ action: 'project.manage', query: z.object({ kind: z.enum(ORG_KINDS).optional() }) }, async ({ db, query }) => ({
  organisations: await listOrganisations(db, query.kind),
}));

export const POST = withRoute({ action: 'project.manage', body: registerOrganisationSchema }, async ({ db, principal, body }) =>
  NextResponse.json({ organisation: await registerOrganisation(db, principal, body) }, { status: 201 }),
);
