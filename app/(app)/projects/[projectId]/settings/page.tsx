import type { Metadata } from 'next';
import { getDb } from '@/db/client';
import { listOrganisations } from '@/db/organisations';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { listOrgChanges } from '@/db/org-changes';
import { Card, Notice, PageHeader } from '@/components/ui/primitives';
import { ProjectForm } from '@/components/forms/project-form';
import { OrgChangePanel } from '@/components/forms/org-change-panel';
import { RecordSettingsForm } from '@/components/forms/record-settings-form';
import { HouseholdSettingsForm } from '@/components/forms/household-settings-form';
import { listColourSequences } from '@/db/catalogues';
import { shownSystem } from '@/lib/records/units';

export const metadata: Metadata = { title: 'Project settings' };

export default async function ProjectSettingsPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { me, project, allowed } = await requireProjectPage(projectId, 'project.manage');
  if (!allowed) return <Notice tone="bad">Only administrators change project settings.</Notice>;
  const db = getDb();
  const [changes, organisations, sequences] = await Promise.all([listOrgChanges(db, project.id), listOrganisations(db), listColourSequences(db, project.id)]);
  return (
    <>
      <PageHeader title="Project settings" subtitle={project.name} />
      <div className="space-y-6">
        <Card>
          <ProjectForm
            mode="edit"
            projectId={project.id}
            initial={{
              name: project.name,
              areaName: project.areaName,
              defaultCrs: project.defaultCrs.replace(/^EPSG:/, ''),
              // 7 decimals of a degree is about a centimetre: PostGIS's doubles print with float noise beyond it
              extent: project.extent && (project.extent.map((v) => Number(v.toFixed(7))) as [number, number, number, number]),
              timeZone: project.timeZone,
              unitSystem: project.unitSystem,
              minCoverDepthM: project.minCoverDepthM,
              lateralToleranceM: project.lateralToleranceM,
              defaultAccuracyClass: project.defaultAccuracyClass,
              accuracySigmas: project.accuracySigmas,
            }}
          />
        </Card>
        <Card title="Trench records">
          <p className="mb-4 text-sm text-ink-soft">What the records are checked against. The minimum cover depth is set above.</p>
          <RecordSettingsForm
            projectId={project.id}
            initial={{ ...project.records, colourSequenceId: project.records.colourSequenceId ?? undefined }}
            sequences={sequences.map((q) => ({ id: q.id, name: q.name }))}
            system={shownSystem(me.unitSystem, project.unitSystem)}
          />
        </Card>
        <Card title="Households passed">
          <p className="mb-4 text-sm text-ink-soft">
            How addresses are tied to their serving street route and counted as passed. Changing them works the figures out again; see the
            definition on the Households page.
          </p>
          <HouseholdSettingsForm projectId={project.id} initial={project.households} system={shownSystem(me.unitSystem, project.unitSystem)} />
        </Card>
        <Card title="Network owner and contractor">
          <OrgChangePanel
            projectId={project.id}
            myOrganisationId={me.organisationId}
            owner={{ id: project.ownerOrgId, name: project.ownerOrgName }}
            contractor={{ id: project.contractorOrgId, name: project.contractorOrgName }}
            changes={changes}
            organisations={organisations}
            timeZone={project.timeZone}
          />
        </Card>
      </div>
    </>
  );
}
