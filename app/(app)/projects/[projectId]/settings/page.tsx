import type { Metadata } from 'next';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { Card, Notice, PageHeader } from '@/components/ui/primitives';
import { ProjectForm } from '@/components/forms/project-form';

export const metadata: Metadata = { title: 'Project settings' };

export default async function ProjectSettingsPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { me, project, allowed } = await requireProjectPage(projectId, 'project.manage');
  if (!allowed) return <Notice tone="bad">Only administrators change project settings.</Notice>;
  const ownerSide = me.organisationKind === 'owner';
  return (
    <>
      <PageHeader title="Project settings" subtitle={project.name} />
      <Card>
        <ProjectForm
          mode="edit"
          projectId={project.id}
          partnerLabel={ownerSide ? 'Contractor' : 'Network owner'}
          initial={{
            name: project.name,
            partnerOrganisation: ownerSide ? project.contractorOrgName : project.ownerOrgName,
            areaName: project.areaName,
            defaultCrs: project.defaultCrs,
            extent: project.extent,
            timeZone: project.timeZone,
            unitSystem: project.unitSystem,
            minCoverDepthM: project.minCoverDepthM,
            lateralToleranceM: project.lateralToleranceM,
            defaultAccuracyClass: project.defaultAccuracyClass,
            accuracySigmas: project.accuracySigmas,
          }}
        />
      </Card>
    </>
  );
}
