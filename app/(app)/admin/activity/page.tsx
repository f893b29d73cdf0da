import type { Metadata } from 'next';
import { getDb } from '@/db/client';
import { listAuditForOrganisation } from '@/db/audit';
import { requirePrincipal } from '@/lib/auth/session';
import { can } from '@/lib/auth/roles';
import { Notice, PageHeader } from '@/components/ui/primitives';
import { AuditTable } from '@/components/audit-table';

export const metadata: Metadata = { title: 'Activity' };

export default async function OrganisationActivityPage() {
  const me = await requirePrincipal();
  if (!can(me.role, 'audit.read')) return <Notice tone="bad">Only administrators see the activity log.</Notice>;
  const entries = await listAuditForOrganisation(getDb(), me.organisationId);
  return (
    <>
      <PageHeader title="Activity" subtitle="Changes to people and API tokens of your organisation. Each project has its own log." />
      <AuditTable entries={entries} timeZone="UTC" />
    </>
  );
}
