import { describe, expect, it } from 'vitest';
import { hashPassword, temporaryPassword, verifyPassword, MIN_PASSWORD_LENGTH } from '@/lib/auth/password';

describe('password hashing (scrypt)', () => {
  it('verifies against the published scrypt test vector', async () => {
    // RFC 7914 section 12, second vector: P="password", S="NaCl", N=1024, r=8, p=16, dkLen=64 [published]
    const dk =
      'fdbabe1c9d3472007856e7190d01e9fe7c6ad7cbc8237830e77376634b3731622eaf30d92e22a3886ff109279d9830dac727afb94a83ee6d8360cbdfa2cc0640';
    const encoded = ['scrypt', 1024, 8, 16, Buffer.from('NaCl').toString('base64url'), Buffer.from(dk, 'hex').toString('base64url')].join('$');
    expect(await verifyPassword('password', encoded)).toBe(true);
    expect(await verifyPassword('Password', encoded)).toBe(false);
  });

  it('round-trips and salts each hash', async () => {
    const a = await hashPassword('correct horse battery');
    const b = await hashPassword('correct horse battery');
    expect(a).not.toBe(b);
    expect(await verifyPassword('correct horse battery', a)).toBe(true);
    expect(await verifyPassword('correct horse batterY', a)).toBe(false);
  });

  it('refuses missing or foreign hash formats', async () => {
    expect(await verifyPassword('x', null)).toBe(false);
    expect(await verifyPassword('x', '$2b$10$abcdefghijklmnopqrstuv')).toBe(false);
  });

  it('makes temporary passwords that meet the length policy', () => {
    for (let i = 0; i < 50; i++) expect(temporaryPassword().length).toBeGreaterThanOrEqual(MIN_PASSWORD_LENGTH);
  });
});
