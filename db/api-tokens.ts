import type { Db } from './client';
import type { ApiTokenRow, UserRow } from './tables';
import type { OrgKind } from '@/lib/auth/roles';

export interface ApiToken {
  id: string;
  name: string;
  prefix: string;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
}

const toDto = (r: ApiTokenRow): ApiToken => ({
  id: r.id,
  name: r.name,
  prefix: r.prefix,
  createdAt: r.created_at.toISOString(),
  lastUsedAt: r.last_used_at?.toISOString() ?? null,
  revokedAt: r.revoked_at?.toISOString() ?? null,
});

export async function insertApiToken(
  db: Db,
  t: { userId: string; name: string; prefix: string; tokenHash: string },
): Promise<ApiToken> {
  const [row] = await db<ApiTokenRow>('api_tokens')
    .insert({ user_id: t.userId, name: t.name, prefix: t.prefix, token_hash: t.tokenHash })
    .returning('*');
  return toDto(row);
}

export async function listApiTokens(db: Db, userId: string): Promise<ApiToken[]> {
  const rows = await db<ApiTokenRow>('api_tokens').where({ user_id: userId }).orderBy('created_at', 'desc');
  return rows.map(toDto);
}

export async function getApiToken(db: Db, id: string): Promise<(ApiToken & { userId: string }) | undefined> {
  const row = await db<ApiTokenRow>('api_tokens').where({ id }).first();
  return row && { ...toDto(row), userId: row.user_id };
}

/**
 * The live token's owner with the name and kind of its organisation (so the principal needs no second query),
 * or undefined when the hash is unknown or the token revoked.
 */
export async function findUserByTokenHash(db: Db, tokenHash: string): Promise<(UserRow & { org_name: string; org_kind: OrgKind }) | undefined> {
  const row = await db('api_tokens as t')
    .join('users as u', 'u.id', 't.user_id')
    .join('organisations as o', 'o.id', 'u.organisation_id')
    .where('t.token_hash', tokenHash)
    .whereNull('t.revoked_at')
    .select('u.*', 'o.name as org_name', 'o.kind as org_kind', 't.id as token_id', db.raw('(t.last_used_at IS NULL OR t.last_used_at < now() - interval \'1 minute\') AS token_stale'))
    .first();
  if (!row) return undefined;
  // "last used" to the minute: a token that calls many times a minute is not written (and synced) each time
  if (row.token_stale) await db('api_tokens').where({ id: row.token_id }).update({ last_used_at: db.fn.now() });
  delete row.token_id;
  delete row.token_stale;
  return row as UserRow & { org_name: string; org_kind: OrgKind };
}

export async function revokeApiToken(db: Db, id: string): Promise<void> {
  await db('api_tokens').where({ id }).whereNull('revoked_at').update({ revoked_at: db.fn.now() });
}

/** Revokes every live token of a user; returns how many were revoked. */
export async function revokeUserApiTokens(db: Db, userId: string): Promise<number> {
  return db('api_tokens').where({ user_id: userId }).whereNull('revoked_at').update({ revoked_at: db.fn.now() });
}
