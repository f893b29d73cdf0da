import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { hashSecret, looksLikeApiToken, looksLikeLinkToken, makeSecret } from '@/lib/auth/secret-token';

describe('API tokens and one-time links', () => {
  it('stores only the SHA-256 of the secret', () => {
    const { secret, hash, prefix } = makeSecret('tb');
    expect(looksLikeApiToken(secret)).toBe(true);
    expect(secret.startsWith(prefix)).toBe(true);
    expect(hash).toBe(createHash('sha256').update(secret).digest('hex'));
    // FIPS 180-4 / NIST example: SHA-256("abc") [published]
    expect(hashSecret('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });

  it('tells tokens from links and from junk', () => {
    expect(looksLikeApiToken(makeSecret('tbl').secret)).toBe(false);
    expect(looksLikeLinkToken(makeSecret('tbl').secret)).toBe(true);
    for (const junk of ['', 'tb_', 'tb_short', `tb_${'a'.repeat(44)}`, `xx_${'a'.repeat(43)}`, `tb_${'a'.repeat(42)}!`]) {
      expect(looksLikeApiToken(junk)).toBe(false);
    }
  });
});
