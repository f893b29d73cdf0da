import { createHash, randomBytes } from 'node:crypto';

/**
 * Opaque secrets (API tokens, one-time links): random bytes, shown once, stored only as SHA-256.
 * `makeSecret('tb')` → `{ secret: 'tb_…43 chars', hash: '…64 hex', prefix: 'tb_abcd' }`
 */
export function makeSecret(kind: 'tb' | 'tbl'): { secret: string; hash: string; prefix: string } {
  const secret = `${kind}_${randomBytes(32).toString('base64url')}`;
  return { secret, hash: hashSecret(secret), prefix: secret.slice(0, kind.length + 5) };
}

export function hashSecret(secret: string): string {
  return createHash('sha256').update(secret, 'utf8').digest('hex');
}

const TOKEN_SHAPE = /^tb_[A-Za-z0-9_-]{43}$/;
const LINK_SHAPE = /^tbl_[A-Za-z0-9_-]{43}$/;

/** True when the string has the shape of an API token; anything else is refused before a lookup. */
export function looksLikeApiToken(s: string): boolean {
  return TOKEN_SHAPE.test(s);
}

export function looksLikeLinkToken(s: string): boolean {
  return LINK_SHAPE.test(s);
}
