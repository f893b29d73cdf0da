import type { Db } from './client';
import type { UserLinkRow } from './tables';

export async function insertUserLink(
  db: Db,
  link: { userId: string; purpose: UserLinkRow['purpose']; tokenHash: string; expiresAt: Date; createdBy: string | null },
): Promise<void> {
  // a new link replaces any unused one of the same user
  await db('user_links').where({ user_id: link.userId }).whereNull('used_at').update({ used_at: db.fn.now() });
  await db('user_links').insert({
    user_id: link.userId,
    purpose: link.purpose,
    token_hash: link.tokenHash,
    expires_at: link.expiresAt,
    created_by: link.createdBy,
  });
}

/** The unused, unexpired link with this hash, locked for the caller's transaction. */
export async function findLiveUserLink(db: Db, tokenHash: string): Promise<UserLinkRow | undefined> {
  return db<UserLinkRow>('user_links')
    .where({ token_hash: tokenHash })
    .whereNull('used_at')
    .where('expires_at', '>', db.fn.now())
    .forUpdate()
    .first();
}

export async function markUserLinkUsed(db: Db, id: string): Promise<void> {
  await db('user_links').where({ id }).update({ used_at: db.fn.now() });
}
