import type { Db } from '@/db/client';
import { getUserRow } from '@/db/users';
import { getOrganisation } from '@/db/organisations';
import type { UserRow } from '@/db/tables';
import type { OrgKind, Role } from './roles';

/** The signed-in person as every route and page sees them: role and organisation read fresh per request. */
export interface Principal {
  id: string;
  email: string;
  name: string;
  role: Role;
  organisationId: string;
  organisationName: string;
  organisationKind: OrgKind;
  /** the person's own choice of units, or null to follow each project's */
  unitSystem: 'metric' | 'imperial' | null;
}

export async function principalFromRow(db: Db, row: (UserRow & { org_name?: string; org_kind?: OrgKind }) | undefined): Promise<Principal | undefined> {
  if (!row || !row.active) return undefined;
  // a row read with its organisation (the API token's lookup joins it) needs no second query
  const org = row.org_name !== undefined && row.org_kind !== undefined ? { id: row.organisation_id, name: row.org_name, kind: row.org_kind } : await getOrganisation(db, row.organisation_id);
  if (!org) return undefined;
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    role: row.role,
    organisationId: org.id,
    organisationName: org.name,
    organisationKind: org.kind,
    unitSystem: row.unit_system ?? null,
  };
}

/** Loads the user afresh: a deactivated user or a changed role takes effect on the next request. */
export async function loadPrincipal(db: Db, userId: string): Promise<Principal | undefined> {
  return principalFromRow(db, await getUserRow(db, userId));
}

export function auditActor(p: Principal) {
  return { userId: p.id, label: `${p.name} <${p.email}>`, organisationId: p.organisationId };
}
