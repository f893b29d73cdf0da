import type { Db } from './client';

export async function recordSignInAttempt(db: Db, a: { email: string; ip: string; succeeded: boolean }): Promise<void> {
  await db('sign_in_attempts').insert({ email: a.email.trim().toLowerCase(), ip: a.ip, succeeded: a.succeeded });
}

/** Failed attempts within the window, counted per e-mail and per client IP. */
export async function countRecentFailures(
  db: Db,
  a: { email: string; ip: string; windowSeconds: number },
): Promise<{ byEmail: number; byIp: number }> {
  const since = db.raw(`now() - make_interval(secs => ?)`, [a.windowSeconds]);
  const [byEmail, byIp] = await Promise.all([
    db('sign_in_attempts')
      .where({ email: a.email.trim().toLowerCase(), succeeded: false })
      .where('at', '>', since)
      .count<{ count: number }[]>('* as count'),
    db('sign_in_attempts').where({ ip: a.ip, succeeded: false }).where('at', '>', since).count<{ count: number }[]>('* as count'),
  ]);
  return { byEmail: Number(byEmail[0].count), byIp: Number(byIp[0].count) };
}
