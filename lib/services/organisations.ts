import type { Knex } from 'knex';
import { z } from 'zod';
import { writeAudit } from '@/db/audit';
import { getOrganisationContact, insertOrganisation, listOrganisations, setOrganisationContact, type Organisation } from '@/db/organisations';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { can, ORG_KINDS } from '@/lib/auth/roles';

export const registerOrganisationSchema = z.object({
  name: z.string().trim().min(2, 'Give the organisation’s full name.').max(200),
  kind: z.enum(ORG_KINDS, { message: 'Say whether it is a network owner or a contractor.' }),
});

/** Letters and digits only, lower case: "Tarnwick Slot & Duct Ltd." and "tarnwick slot duct ltd" are one name. */
const nameKey = (s: string) => s.toLowerCase().replace(/[^\p{L}\p{N}]+/gu, '');

/**
 * Registers a new organisation, as a deliberate step of its own: projects pick their owner and contractor
 * from the registered ones and never create one from a typed name. Refuses a name that differs from a
 * registered one only in case, spaces or punctuation.
 */
export async function registerOrganisation(db: Knex, actor: Principal, input: z.infer<typeof registerOrganisationSchema>): Promise<Organisation> {
  return db.transaction(async (trx) => {
    const same = (await listOrganisations(trx)).find((o) => nameKey(o.name) === nameKey(input.name));
    if (same) {
      throw new AppError('conflict', `"${same.name}" is already registered (as a ${same.kind === 'owner' ? 'network owner' : 'contractor'}); pick it from the list.`, [
        { path: 'name', message: `Already registered as "${same.name}".` },
      ]);
    }
    const org = await insertOrganisation(trx, input.name, input.kind);
    await writeAudit(trx, auditActor(actor), { organisationId: actor.organisationId, objectType: 'organisation', objectId: org.id, action: 'register', after: org });
    return org;
  });
}

export const organisationContactSchema = z.object({
  contact: z.string().trim().max(500, 'Keep the contact to 500 characters: a desk, a telephone number, an e-mail address.'),
}).strict();

/** The person's own organisation, with the contact the duct lookup shows beside its network. */
export async function ownOrganisation(db: Knex, actor: Principal): Promise<Organisation & { contact: string }> {
  const org = await getOrganisationContact(db, actor.organisationId);
  if (!org) throw new AppError('not_found', 'Your organisation is not registered.');
  return org;
}

/**
 * Sets how to reach the organisation about its network (shown to maintenance crews in the duct lookup beside
 * each stretch the organisation owns): the organisation's administrators only, with an audit entry.
 */
export async function setOwnContact(db: Knex, actor: Principal, input: z.infer<typeof organisationContactSchema>): Promise<Organisation & { contact: string }> {
  if (!can(actor.role, 'user.manage')) throw new AppError('forbidden', `Your role (${actor.role}) may not change the organisation's contact; its administrators do.`);
  return db.transaction(async (trx) => {
    const before = await getOrganisationContact(trx, actor.organisationId);
    if (!before) throw new AppError('not_found', 'Your organisation is not registered.');
    if (before.contact === input.contact) return before;
    await setOrganisationContact(trx, actor.organisationId, input.contact);
    await writeAudit(trx, auditActor(actor), { organisationId: actor.organisationId, objectType: 'organisation', objectId: before.id, action: 'contact', before: { contact: before.contact }, after: { contact: input.contact } });
    return { ...before, contact: input.contact };
  });
}
