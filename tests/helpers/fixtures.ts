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
