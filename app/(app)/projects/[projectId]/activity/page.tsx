import type { Metadata } from 'next';
import { getDb } from '@/db/client';
import { listAuditForProject } from '@/db/audit';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { Notice, PageHeader } from '@/components/ui/primitives';
import { AuditTable } from '@/components/audit-table';
import { JobButton } from '@/components/forms/job-button';

export const metadata: Metadata = { title: 'Activity log' };

export default async function ProjectActivityPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { project, allowed } = await requireProjectPage(projectId, 'audit.read');
  if (!allowed) return <Notice tone="bad">Only administrators see the activity log.</Notice>;
  const entries = await listAuditForProject(getDb(), project.id);
  return (
    <>
      <PageHeader
        title="Activity log"
        subtitle={`${project.name}: who changed what, and when (times in ${project.timeZone}).`}
        actions={<JobButton startUrl={`/api/projects/${project.id}/audit/exports`} label="Export as CSV" resultLabel="Download the CSV" />}
      />
      <AuditTable entries={entries} timeZone={project.timeZone} />
    </>
  );
}
