import { NextResponse } from 'next/server';
import { withRoute } from '@/lib/api/with-route';
import { createToken, createTokenSchema, listTokens } from '@/lib/services/tokens';

export const GET = withRoute({ action: 'token.manage' }, async ({ db, principal }) => ({
  tokens: await listTokens(db, principal),
}));

export const POST = withRoute({ action: 'token.manage', body: createTokenSchema }, async ({ db, principal, body }) =>
  NextResponse.json(await createToken(db, principal, body), { status: 201 }),
);
