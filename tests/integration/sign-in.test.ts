import { afterAll, describe, expect, it } from 'vitest';
import { randomUUID } from 'node:crypto';
import { closeDb, getDb } from '@/db/client';
import { attemptSignIn } from '@/lib/services/sign-in';
import { makePrincipal } from '../helpers/fixtures';

const db = getDb();
afterAll(() => closeDb());

describe('sign-in limits, counted in PostgreSQL', () => {
  it('accepts the right password and refuses a wrong one the same way as an unknown e-mail', async () => {
    const p = await makePrincipal(db, 'surveyor', 'contractor');
    const limits = { maxPerEmail: 5, maxPerIp: 100, windowSeconds: 60 };
    const ip = `10.0.${Math.floor(Math.random() * 250)}.1`;
    expect(await attemptSignIn(db, { email: p.email, password: 'a-long-test-password', ip }, limits)).toEqual({ ok: true, userId: p.id });
    expect(await attemptSignIn(db, { email: p.email, password: 'wrong-password-here', ip }, limits)).toEqual({ ok: false, reason: 'invalid_credentials' });
    expect(await attemptSignIn(db, { email: `nobody-${randomUUID()}@test.example`, password: 'x', ip }, limits)).toEqual({ ok: false, reason: 'invalid_credentials' });
  });

  it('trips per e-mail, then recovers when the window has passed', async () => {
    const p = await makePrincipal(db, 'engineer', 'contractor');
    const limits = { maxPerEmail: 3, maxPerIp: 100, windowSeconds: 2 };
    const ip = `tests-${randomUUID()}`;
    for (let i = 0; i < 3; i++) {
      expect((await attemptSignIn(db, { email: p.email, password: 'nope-nope-nope', ip }, limits)).ok).toBe(false);
    }
    // even the right password is refused while the limit holds
    expect(await attemptSignIn(db, { email: p.email, password: 'a-long-test-password', ip }, limits)).toEqual({ ok: false, reason: 'too_many_attempts' });
    await new Promise((r) => setTimeout(r, 2200));
    expect(await attemptSignIn(db, { email: p.email, password: 'a-long-test-password', ip }, limits)).toEqual({ ok: true, userId: p.id });
  });

  it('trips per client IP across different e-mails', async () => {
    const p = await makePrincipal(db, 'owner', 'owner');
    const limits = { maxPerEmail: 100, maxPerIp: 4, windowSeconds: 60 };
    const ip = `tests-${randomUUID()}`;
    for (let i = 0; i < 4; i++) await attemptSignIn(db, { email: `guess${i}-${randomUUID()}@test.example`, password: 'x', ip }, limits);
    expect(await attemptSignIn(db, { email: p.email, password: 'a-long-test-password', ip }, limits)).toEqual({ ok: false, reason: 'too_many_attempts' });
    // another address is not affected
    expect((await attemptSignIn(db, { email: p.email, password: 'a-long-test-password', ip: `${ip}-other` }, limits)).ok).toBe(true);
  });

  it('refuses a deactivated user with the right password', async () => {
    const p = await makePrincipal(db, 'maintenance', 'owner');
    await db('users').where({ id: p.id }).update({ active: false });
    const limits = { maxPerEmail: 5, maxPerIp: 100, windowSeconds: 60 };
    expect(await attemptSignIn(db, { email: p.email, password: 'a-long-test-password', ip: `tests-${randomUUID()}` }, limits)).toEqual({
      ok: false,
      reason: 'invalid_credentials',
    });
  });
});
