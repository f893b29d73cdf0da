import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import { addUser } from '@/lib/services/operators';
import { loadPrincipal, type Principal } from '@/lib/auth/principal';
import type { OrgKind, Role } from '@/lib/auth/roles';

/** A fresh organisation (unique name) with one user of the given role; each test gets its own. */
export async function makePrincipal(db: Knex, role: Role, kind: OrgKind, org?: string): Promise<Principal> {
  const tag = randomUUID().slice(0, 8);
  const { userId } = await addUser(db, {
    email: `${role}-${tag}@test.example`,
    name: `Test ${role} ${tag}`,
    role,
    org: org ?? `Test ${kind} org ${tag}`,
    orgKind: kind,
    password: 'a-long-test-password',
    token: false,
  });
  return (await loadPrincipal(db, userId))!;
}

export async function count(db: Knex, table: string): Promise<number> {
  const [{ n }] = await db(table).count<{ n: number }[]>('* as n');
  return Number(n);
}

/** How many files lie below a folder (0 when it does not exist): "nothing half-stored" is asserted on it. */
export async function countFiles(dir: string): Promise<number> {
  const { readdir } = await import('node:fs/promises');
  const path = await import('node:path');
  let n = 0;
  const walk = async (d: string) => {
    for (const e of await readdir(d, { withFileTypes: true }).catch(() => [])) {
      if (e.isDirectory()) await walk(path.join(d, e.name));
      else n++;
    }
  };
  await walk(dir);
  return n;
}

/**
 * Registers an organisation on the other side of the actor's (a project picks its partner from the
 * registered ones) and returns its name, for `createProjectSchema.parse({ partnerOrganisation: … })`.
 * An existing one of that name is reused.
 */
export async function registerPartner(db: Knex, actor: Principal, name: string): Promise<string> {
  const { findOrganisationByName, insertOrganisation } = await import('@/db/organisations');
  const found = await findOrganisationByName(db, name);
  if (!found) await insertOrganisation(db, name, actor.organisationKind === 'owner' ? 'contractor' : 'owner');
  return name;
}
