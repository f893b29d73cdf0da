import { z } from 'zod';
import type { Knex } from 'knex';
import { findOrganisationByName, insertOrganisation } from '@/db/organisations';
import { getUserRowByEmail, insertUser, updateUser } from '@/db/users';
import { insertApiToken } from '@/db/api-tokens';
import { writeAudit } from '@/db/audit';
import { hashPassword } from '@/lib/auth/password';
import { makeSecret } from '@/lib/auth/secret-token';
import { ORG_KINDS, ROLES } from '@/lib/auth/roles';
import { passwordSchema } from './users';

export const addUserSchema = z.object({
  email: z.email('--email: give a valid e-mail address'),
  name: z.string().trim().min(1, '--name: give a name'),
  role: z.enum(ROLES, { message: `--role: one of ${ROLES.join(', ')}` }),
  org: z.string().trim().min(2, '--org: give the organisation name'),
  orgKind: z.enum(ORG_KINDS, { message: '--org-kind: owner or contractor' }),
  password: passwordSchema.optional(),
  token: z.boolean().default(false),
});

/**
 * For first set-up and operators: creates (or updates) a user and their organisation when missing.
 * Idempotent on e-mail, so the demo seed can call it on every start.
 */
export async function addUser(
  db: Knex,
  input: z.infer<typeof addUserSchema>,
): Promise<{ userId: string; created: boolean; token?: string }> {
  return db.transaction(async (trx) => {
    let org = await findOrganisationByName(trx, input.org);
    if (org && org.kind !== input.orgKind) {
      throw new Error(`Organisation "${org.name}" exists as a ${org.kind}, not a ${input.orgKind}.`);
    }
    const actor = { userId: null, label: 'operator (command line)', organisationId: null };
    if (!org) {
      org = await insertOrganisation(trx, input.org, input.orgKind);
      await writeAudit(trx, actor, { organisationId: org.id, objectType: 'organisation', objectId: org.id, action: 'create', after: org });
    }
    const existing = await getUserRowByEmail(trx, input.email);
    if (existing && existing.organisation_id !== org.id) {
      throw new Error(`${input.email} already belongs to another organisation.`);
    }
    let userId: string;
    const passwordHash = input.password ? await hashPassword(input.password) : null;
    if (existing) {
      userId = existing.id;
      if (existing.role !== input.role || existing.name !== input.name) {
        await updateUser(trx, userId, { role: input.role, name: input.name });
        await writeAudit(trx, actor, {
          organisationId: org.id,
          objectType: 'user',
          objectId: userId,
          action: 'update',
          before: { name: existing.name, role: existing.role },
          after: { name: input.name, role: input.role },
        });
      }
    } else {
      userId = (await insertUser(trx, { organisationId: org.id, email: input.email, name: input.name, role: input.role, passwordHash })).id;
      await writeAudit(trx, actor, {
        organisationId: org.id,
        objectType: 'user',
        objectId: userId,
        action: 'create',
        after: { email: input.email.toLowerCase(), name: input.name, role: input.role },
      });
    }
    let token: string | undefined;
    if (input.token) {
      const s = makeSecret('tb');
      await insertApiToken(trx, { userId, name: 'command line', prefix: s.prefix, tokenHash: s.hash });
      token = s.secret;
    }
    return { userId, created: !existing, token };
  });
}
