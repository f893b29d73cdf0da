import { z } from 'zod';
import { appUrl, enqueueMail } from '@/lib/mail/outbox';
import type { Knex } from 'knex';
import { getUserRow, getUserRowByEmail, insertUser, listUsers, toUserDto, updateUser, type User } from '@/db/users';
import { findLiveUserLink, insertUserLink, markUserLinkUsed } from '@/db/user-links';
import { revokeUserApiTokens } from '@/db/api-tokens';
import { writeAudit } from '@/db/audit';
import { AppError } from '@/lib/api/errors';
import { hashPassword, MIN_PASSWORD_LENGTH, temporaryPassword } from '@/lib/auth/password';
import { hashSecret, looksLikeLinkToken, makeSecret } from '@/lib/auth/secret-token';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { ROLES } from '@/lib/auth/roles';

export const passwordSchema = z
  .string()
  .min(MIN_PASSWORD_LENGTH, `Use at least ${MIN_PASSWORD_LENGTH} characters.`)
  .max(256, 'Use at most 256 characters.');

export const createUserSchema = z.object({
  email: z.email('Enter a valid e-mail address.').max(320),
  name: z.string().trim().min(1, 'Enter a name.').max(200),
  role: z.enum(ROLES),
  /** "password": a temporary password is made and shown once; "invitation": a one-time link is */
  onboarding: z.enum(['password', 'invitation']).default('invitation'),
});

export const updateUserSchema = z
  .object({
    role: z.enum(ROLES).optional(),
    active: z.boolean().optional(),
    name: z.string().trim().min(1).max(200).optional(),
    /** issue new credentials: a temporary password, or a one-time reset link */
    reset: z.enum(['password', 'link']).optional(),
  })
  .refine((v) => Object.values(v).some((x) => x !== undefined), 'Nothing to change.');

export interface Onboarding {
  temporaryPassword?: string;
  /** path of the one-time link, e.g. /welcome/tbl_… */
  linkPath?: string;
  linkExpiresAt?: string;
}

const linkTtlMs = (hours: number) => hours * 3600 * 1000;

async function issueCredentials(
  trx: Knex.Transaction,
  actor: Principal | null,
  userId: string,
  kind: 'password' | 'invitation' | 'link',
  linkTtlHours: number,
): Promise<Onboarding> {
  if (kind === 'password') {
    const pw = temporaryPassword();
    await updateUser(trx, userId, { passwordHash: await hashPassword(pw) });
    return { temporaryPassword: pw };
  }
  const { secret, hash } = makeSecret('tbl');
  const expiresAt = new Date(Date.now() + linkTtlMs(linkTtlHours));
  await insertUserLink(trx, {
    userId,
    purpose: kind === 'invitation' ? 'invitation' : 'reset',
    tokenHash: hash,
    expiresAt,
    createdBy: actor?.id ?? null,
  });
  const linkPath = `/welcome/${secret}`;
  // the link by e-mail too (issue 16), queued in this transaction: see lib/mail/outbox.ts
  const user = (await getUserRow(trx, userId))!;
  const invited = kind === 'invitation';
  await enqueueMail(trx, {
    kind: invited ? 'invitation' : 'reset',
    to: [user.email],
    subject: invited ? 'Your Trenchbook account' : 'Set a new Trenchbook password',
    body: [
      `Hello ${user.name},`,
      '',
      invited
        ? `${actor ? `${actor.name} (${actor.organisationName})` : 'An administrator'} has made you a Trenchbook account. Open this link to choose your password:`
        : 'Open this link to choose a new password for your Trenchbook account:',
      '',
      `${appUrl()}${linkPath}`,
      '',
      `The link works once and until ${expiresAt.toISOString().slice(0, 16).replace('T', ' ')} UTC.`,
    ].join('\n'),
  });
  return { linkPath, linkExpiresAt: expiresAt.toISOString() };
}

/** Creates a user in the admin's organisation, audited, with a temporary password or a one-time link. */
export async function createUser(
  db: Knex,
  actor: Principal,
  input: z.infer<typeof createUserSchema>,
  linkTtlHours: number,
): Promise<{ user: User; onboarding: Onboarding }> {
  return db.transaction(async (trx) => {
    if (await getUserRowByEmail(trx, input.email)) {
      throw new AppError('conflict', `A user with the e-mail ${input.email} already exists.`);
    }
    const user = await insertUser(trx, { ...input, organisationId: actor.organisationId, passwordHash: null });
    const onboarding = await issueCredentials(trx, actor, user.id, input.onboarding, linkTtlHours);
    await writeAudit(trx, auditActor(actor), {
      objectType: 'user',
      objectId: user.id,
      action: 'create',
      after: { email: user.email, name: user.name, role: user.role, onboarding: input.onboarding },
    });
    return { user: toUserDto((await getUserRow(trx, user.id))!), onboarding };
  });
}

/**
 * Changes a user of the admin's organisation. Deactivating or changing the role revokes their API tokens;
 * both take effect on the user's next request because every request reads the user afresh.
 */
export async function changeUser(
  db: Knex,
  actor: Principal,
  userId: string,
  patch: z.infer<typeof updateUserSchema>,
  linkTtlHours: number,
): Promise<{ user: User; onboarding?: Onboarding; revokedTokens: number }> {
  return db.transaction(async (trx) => {
    const before = await getUserRow(trx, userId);
    if (!before || before.organisation_id !== actor.organisationId) throw new AppError('not_found', 'User not found.');
    if (userId === actor.id && (patch.active === false || (patch.role && patch.role !== 'admin'))) {
      throw new AppError('conflict', 'You cannot deactivate yourself or remove your own admin role.');
    }
    await updateUser(trx, userId, { role: patch.role, active: patch.active, name: patch.name });
    let revokedTokens = 0;
    const roleChanged = patch.role !== undefined && patch.role !== before.role;
    const deactivated = patch.active === false && before.active;
    if (roleChanged || deactivated) revokedTokens = await revokeUserApiTokens(trx, userId);
    const onboarding = patch.reset ? await issueCredentials(trx, actor, userId, patch.reset, linkTtlHours) : undefined;
    const after = (await getUserRow(trx, userId))!;
    const pick = (u: typeof after) => ({ name: u.name, role: u.role, active: u.active });
    await writeAudit(trx, auditActor(actor), {
      objectType: 'user',
      objectId: userId,
      action: patch.reset ? `update+reset_${patch.reset}` : 'update',
      before: pick(before),
      after: { ...pick(after), revokedTokens },
    });
    return { user: toUserDto(after), onboarding, revokedTokens };
  });
}

export async function listOrganisationUsers(db: Knex, actor: Principal): Promise<User[]> {
  return listUsers(db, actor.organisationId);
}

export const acceptLinkSchema = z.object({ token: z.string(), password: passwordSchema });

/** Sets the password through a one-time invitation or reset link; the link works once. */
export async function acceptUserLink(db: Knex, input: z.infer<typeof acceptLinkSchema>): Promise<{ email: string }> {
  if (!looksLikeLinkToken(input.token)) throw new AppError('not_found', 'This link is not valid.');
  return db.transaction(async (trx) => {
    const link = await findLiveUserLink(trx, hashSecret(input.token));
    if (!link) throw new AppError('not_found', 'This link has expired or was already used. Ask your administrator for a new one.');
    const user = await getUserRow(trx, link.user_id);
    if (!user || !user.active) throw new AppError('not_found', 'This link is not valid.');
    await updateUser(trx, user.id, { passwordHash: await hashPassword(input.password) });
    await markUserLinkUsed(trx, link.id);
    await writeAudit(
      trx,
      { userId: user.id, label: `${user.name} <${user.email}>`, organisationId: user.organisation_id },
      { objectType: 'user', objectId: user.id, action: `set_password_via_${link.purpose}` },
    );
    return { email: user.email };
  });
}

/** The person's own units: metric, imperial, or null to follow each project's. Audited like other changes to a person. */
export async function setOwnUnitSystem(db: Knex, actor: Principal, unitSystem: 'metric' | 'imperial' | null): Promise<Principal> {
  return db.transaction(async (trx) => {
    const before = await trx('users').where({ id: actor.id }).first('unit_system');
    await trx('users').where({ id: actor.id }).update({ unit_system: unitSystem, updated_at: trx.fn.now() });
    await writeAudit(trx, auditActor(actor), { objectType: 'user', objectId: actor.id, action: 'update', before: { unitSystem: before?.unit_system ?? null }, after: { unitSystem } });
    return { ...actor, unitSystem };
  });
}
