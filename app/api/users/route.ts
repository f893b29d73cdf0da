import { NextResponse } from 'next/server';
import { withRoute } from '@/lib/api/with-route';
import { env } from '@/lib/env';
import { createUser, createUserSchema, listOrganisationUsers } from '@/lib/services/users';

export const GET = withRoute({ action: 'user.manage' }, async ({ db, principal }) => ({
  users: await listOrganisationUsers(db, principal),
}));

export const POST = withRoute({ action: 'user.manage', body: createUserSchema }, async ({ db, principal, body }) =>
  NextResponse.json(await createUser(db, principal, body, env().LINK_TTL_HOURS), { status: 201 }),
);
