import type { Knex } from 'knex';
import { z } from 'zod';
import { writeAudit } from '@/db/audit';
import { insertOrganisation, listOrganisations, type Organisation } from '@/db/organisations';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { ORG_KINDS } from '@/lib/auth/roles';

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
