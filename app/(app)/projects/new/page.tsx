import type { Metadata } from 'next';
import { requirePrincipal } from '@/lib/auth/session';
import { can } from '@/lib/auth/roles';
import { Card, Notice, PageHeader } from '@/components/ui/primitives';
import { ProjectForm } from '@/components/forms/project-form';

export const metadata: Metadata = { title: 'New project' };

export default async function NewProjectPage() {
  const me = await requirePrincipal();
  if (!can(me.role, 'project.manage')) return <Notice tone="bad">Only administrators create projects.</Notice>;
  return (
    <>
      <PageHeader title="New project" subtitle={`${me.organisationName} is the ${me.organisationKind === 'owner' ? 'network owner' : 'contractor'}.`} />
      <Card>
        <ProjectForm
          mode="create"
          partnerLabel={me.organisationKind === 'owner' ? 'Contractor' : 'Network owner'}
          initial={{
            name: '',
            partnerOrganisation: '',
            areaName: '',
            defaultCrs: 'EPSG:4326',
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
