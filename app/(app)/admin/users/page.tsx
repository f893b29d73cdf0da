import type { Metadata } from 'next';
import { getDb } from '@/db/client';
import { listUsers } from '@/db/users';
import { requirePrincipal } from '@/lib/auth/session';
import { can } from '@/lib/auth/roles';
import { Notice, PageHeader } from '@/components/ui/primitives';
import { PeopleManager } from '@/components/forms/people-manager';
import { OrganisationContactForm } from '@/components/forms/organisation-contact-form';
import { ownOrganisation } from '@/lib/services/organisations';

export const metadata: Metadata = { title: 'People' };

export default async function UsersPage() {
  const me = await requirePrincipal();
  if (!can(me.role, 'user.manage')) return <Notice tone="bad">Only administrators manage people.</Notice>;
  const users = await listUsers(getDb(), me.organisationId);
  const org = await ownOrganisation(getDb(), me);
  return (
    <>
      <PageHeader title="People" subtitle={`Everyone who signs in for ${me.organisationName}.`} />
      <PeopleManager users={users} selfId={me.id} />
      <div className="mt-6">
        <OrganisationContactForm contact={org.contact} ownsNetwork={org.kind === 'owner'} />
      </div>
    </>
  );
}
