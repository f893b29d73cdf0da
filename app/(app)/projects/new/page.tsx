import type { Metadata } from 'next';
import { getDb } from '@/db/client';
import { listOrganisations } from '@/db/organisations';
import { requirePrincipal } from '@/lib/auth/session';
import { can } from '@/lib/auth/roles';
import { Card, Notice, PageHeader } from '@/components/ui/primitives';
import { ProjectForm } from '@/components/forms/project-form';

export const metadata: Metadata = { title: 'New project' };

export default async function NewProjectPage() {
  const me = await requirePrincipal();
  if (!can(me.role, 'project.manage')) return <Notice tone="bad">Only administrators create projects.</Notice>;
  const partnerKind = me.organisationKind === 'owner' ? 'contractor' : 'owner';
  const options = (await listOrganisations(getDb(), partnerKind)).map(({ id, name }) => ({ id, name }));
  return (
    <>
      <PageHeader title="New project" subtitle={`${me.organisationName} is the ${me.organisationKind === 'owner' ? 'network owner' : 'contractor'}.`} />
      <Card>
        <ProjectForm
          mode="create"
          partner={{ label: partnerKind === 'owner' ? 'Network owner' : 'Contractor', kind: partnerKind, options }}
          initial={{
            name: '',
            areaName: '',
            defaultCrs: '4326',
            extent: null,
            timeZone: 'UTC',
            unitSystem: 'metric',
            minCoverDepthM: 0.3,
            lateralToleranceM: 0.5,
            defaultAccuracyClass: 'unknown',
            accuracySigmas: {},
          }}
        />
      </Card>
    </>
  );
}
