import type { Db } from './client';
import type { UserRow } from './tables';
import type { Role } from '@/lib/auth/roles';

export interface User {
  id: string;
  organisationId: string;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  hasPassword: boolean;
  createdAt: string;
}

export const toUserDto = (r: UserRow): User => ({
  id: r.id,
  organisationId: r.organisation_id,
  email: r.email,
  name: r.name,
  role: r.role,
  active: r.active,
  hasPassword: r.password_hash !== null,
  createdAt: r.created_at.toISOString(),
});

export async function getUserRow(db: Db, id: string): Promise<UserRow | undefined> {
  return db<UserRow>('users').where({ id }).first();
}

export async function getUserRowByEmail(db: Db, email: string): Promise<UserRow | undefined> {
  return db<UserRow>('users').whereRaw('lower(email) = lower(?)', [email.trim()]).first();
}

export async function listUsers(db: Db, organisationId: string): Promise<User[]> {
  const rows = await db<UserRow>('users').where({ organisation_id: organisationId }).orderBy('name');
  return rows.map(toUserDto);
}

export async function insertUser(
  db: Db,
  u: { organisationId: string; email: string; name: string; role: Role; passwordHash: string | null },
): Promise<User> {
  const [row] = await db<UserRow>('users')
    .insert({
      organisation_id: u.organisationId,
      email: u.email.trim().toLowerCase(),
      name: u.name.trim(),
      role: u.role,
      password_hash: u.passwordHash,
    })
    .returning('*');
  return toUserDto(row);
}

export async function updateUser(
  db: Db,
  id: string,
  patch: Partial<{ role: Role; active: boolean; name: string; passwordHash: string | null }>,
): Promise<User> {
  const values: Partial<UserRow> & { updated_at: Date } = { updated_at: new Date() };
  if (patch.role !== undefined) values.role = patch.role;
  if (patch.active !== undefined) values.active = patch.active;
  if (patch.name !== undefined) values.name = patch.name.trim();
  if (patch.passwordHash !== undefined) values.password_hash = patch.passwordHash;
  const [row] = await db<UserRow>('users').where({ id }).update(values).returning('*');
  return toUserDto(row);
}
