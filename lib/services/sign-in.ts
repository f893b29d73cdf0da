import type { Db } from '@/db/client';
import { getUserRowByEmail } from '@/db/users';
import { countRecentFailures, recordSignInAttempt } from '@/db/sign-in-attempts';
import { verifyPassword } from '@/lib/auth/password';

export type SignInResult =
  | { ok: true; userId: string }
  | { ok: false; reason: 'invalid_credentials' | 'too_many_attempts' };

export interface SignInLimits {
  maxPerEmail: number;
  maxPerIp: number;
  windowSeconds: number;
}

/**
 * Checks e-mail and password, limited per e-mail and per client IP by failures counted in PostgreSQL.
 * An inactive user and a wrong password give the same answer, so the form reveals nothing.
 */
export async function attemptSignIn(
  db: Db,
  input: { email: string; password: string; ip: string },
  limits: SignInLimits,
): Promise<SignInResult> {
  const email = input.email.trim().toLowerCase();
  const failures = await countRecentFailures(db, { email, ip: input.ip, windowSeconds: limits.windowSeconds });
  if (failures.byEmail >= limits.maxPerEmail || failures.byIp >= limits.maxPerIp) {
    return { ok: false, reason: 'too_many_attempts' };
  }
  const user = await getUserRowByEmail(db, email);
  const good = user !== undefined && user.active && (await verifyPassword(input.password, user.password_hash));
  await recordSignInAttempt(db, { email, ip: input.ip, succeeded: good });
  return good ? { ok: true, userId: user.id } : { ok: false, reason: 'invalid_credentials' };
}
