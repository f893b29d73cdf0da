import { z } from 'zod';
import type { Knex } from 'knex';
import { getApiToken, insertApiToken, listApiTokens, revokeApiToken, type ApiToken } from '@/db/api-tokens';
import { writeAudit } from '@/db/audit';
import { AppError } from '@/lib/api/errors';
import { makeSecret } from '@/lib/auth/secret-token';
import { auditActor, type Principal } from '@/lib/auth/principal';

export const createTokenSchema = z.object({ name: z.string().trim().min(1, 'Name the token.').max(100) });

/** Creates a personal API token; the secret is returned once and only its SHA-256 is stored. */
export async function createToken(
  db: Knex,
  actor: Principal,
  input: z.infer<typeof createTokenSchema>,
): Promise<{ token: ApiToken; secret: string }> {
  return db.transaction(async (trx) => {
    const { secret, hash, prefix } = makeSecret('tb');
    const token = await insertApiToken(trx, { userId: actor.id, name: input.name, prefix, tokenHash: hash });
    await writeAudit(trx, auditActor(actor), {
      objectType: 'api_token',
      objectId: token.id,
      action: 'create',
      after: { name: token.name, prefix },
    });
    return { token, secret };
  });
}

export async function listTokens(db: Knex, actor: Principal): Promise<ApiToken[]> {
  return listApiTokens(db, actor.id);
}

export async function revokeToken(db: Knex, actor: Principal, tokenId: string): Promise<void> {
  await db.transaction(async (trx) => {
    const token = await getApiToken(trx, tokenId);
    if (!token || token.userId !== actor.id) throw new AppError('not_found', 'Token not found.');
    await revokeApiToken(trx, tokenId);
    await writeAudit(trx, auditActor(actor), { objectType: 'api_token', objectId: tokenId, action: 'revoke' });
  });
}
