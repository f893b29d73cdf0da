import type { NextRequest } from 'next/server';
import type { Db } from '@/db/client';
import { findUserByTokenHash } from '@/db/api-tokens';
import { hashSecret, looksLikeApiToken } from '@/lib/auth/secret-token';
import { principalFromRow, type Principal } from '@/lib/auth/principal';
import { currentPrincipal } from '@/lib/auth/session';
import { AppError } from './errors';

/** Bearer token when the Authorization header is present, else the session cookie; 401 otherwise. */
export async function authenticate(req: NextRequest, db: Db): Promise<Principal> {
  const header = req.headers.get('authorization');
  if (header !== null) {
    const m = /^Bearer\s+(\S+)\s*$/i.exec(header);
    if (!m || !looksLikeApiToken(m[1])) {
      throw new AppError('unauthenticated', 'Malformed Authorization header: expected "Bearer tb_…" with a Trenchbook API token.');
    }
    const principal = await principalFromRow(db, await findUserByTokenHash(db, hashSecret(m[1])));
    if (!principal) throw new AppError('unauthenticated', 'This API token is unknown, revoked, or its user is deactivated.');
    return principal;
  }
  const principal = await currentPrincipal();
  if (!principal) throw new AppError('unauthenticated', 'Sign in, or send an API token as "Authorization: Bearer …".');
  return principal;
}
