import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { findUserByTokenHash } from '@/db/api-tokens';
import { hashSecret } from '@/lib/auth/secret-token';
import { createToken } from '@/lib/services/tokens';
import { makePrincipal } from '../helpers/fixtures';

const db = getDb();
afterAll(() => closeDb());

describe("an API token's last use", () => {
  it('is written on the first use and then at most once a minute, not on every request', async () => {
    const me = await makePrincipal(db, 'maintenance', 'owner');
    const { token, secret } = await createToken(db, me, { name: 'use' });
    const lastUsed = async () => (await db('api_tokens').where({ id: token.id }).first('last_used_at')).last_used_at as Date | null;
    expect(await lastUsed()).toBeNull();
    expect((await findUserByTokenHash(db, hashSecret(secret)))?.id).toBe(me.id);
    const first = await lastUsed();
    expect(first).not.toBeNull();
    await new Promise((r) => setTimeout(r, 20));
    const again = await findUserByTokenHash(db, hashSecret(secret));
    expect(again?.id).toBe(me.id);
    expect(again).not.toHaveProperty('token_stale');
    expect((await lastUsed())!.getTime()).toBe(first!.getTime());
    // two minutes on, the next use is written
    await db('api_tokens').where({ id: token.id }).update({ last_used_at: db.raw("now() - interval '2 minutes'") });
    const before = await lastUsed();
    await findUserByTokenHash(db, hashSecret(secret));
    expect((await lastUsed())!.getTime()).toBeGreaterThan(before!.getTime() + 60_000);
  });
});
