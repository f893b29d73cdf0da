import type { Metadata } from 'next';
import { getDb } from '@/db/client';
import { listUsers } from '@/db/users';
import { requirePrincipal } from '@/lib/auth/session';
import { can } from '@/lib/auth/roles';
import { Notice, PageHeader } from '@/components/ui/primitives';
import { PeopleManager } from '@/components/forms/people-manager';

export const metadata: Metadata = { title: 'People' };

export default async function UsersPage() {
  const me = await requirePrincipal();
  if (!can(me.role, 'user.manage')) return <Notice tone="bad">Only administrators manage people.</Notice>;
  const users = await listUsers(getDb(), me.organisationId);
  return (
    <>
      <PageHeader title="People" subtitle={`Everyone who signs in for ${me.organisationName}.`} />
      <PeopleManager users={users} selfId={me.id} />
    </>
  );
}
