import type { Db } from './client';
import type { OrganisationRow } from './tables';
import type { OrgKind } from '@/lib/auth/roles';

export interface Organisation {
  id: string;
  name: string;
  kind: OrgKind;
}

const toDto = (r: OrganisationRow): Organisation => ({ id: r.id, name: r.name, kind: r.kind });

export async function getOrganisation(db: Db, id: string): Promise<Organisation | undefined> {
  const row = await db<OrganisationRow>('organisations').where({ id }).first();
  return row && toDto(row);
}

export async function findOrganisationByName(db: Db, name: string): Promise<Organisation | undefined> {
  const row = await db<OrganisationRow>('organisations').whereRaw('lower(name) = lower(?)', [name.trim()]).first();
  return row && toDto(row);
}

export async function insertOrganisation(db: Db, name: string, kind: OrgKind): Promise<Organisation> {
  const [row] = await db<OrganisationRow>('organisations').insert({ name: name.trim(), kind }).returning('*');
  return toDto(row);
}

/** Every organisation of one kind (or all), by name: the lists owners and contractors are picked from. */
export async function listOrganisations(db: Db, kind?: OrgKind): Promise<Organisation[]> {
  const q = db<OrganisationRow>('organisations').orderByRaw('lower(name)');
  if (kind) q.where({ kind });
  return (await q).map(toDto);
}

/** One organisation with its contact (how to reach it about its network, shown in the duct lookup). */
export async function getOrganisationContact(db: Db, id: string): Promise<(Organisation & { contact: string }) | undefined> {
  const row = await db<OrganisationRow>('organisations').where({ id }).first();
  return row && { ...toDto(row), contact: row.contact };
}

export async function setOrganisationContact(db: Db, id: string, contact: string): Promise<void> {
  await db<OrganisationRow>('organisations').where({ id }).update({ contact });
}
