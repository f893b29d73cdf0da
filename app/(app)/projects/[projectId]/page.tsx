import type { Metadata } from 'next';
import Link from 'next/link';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { formatLength } from '@/lib/records/units';
import { ACCURACY_CLASS_LABELS } from '@/lib/records/accuracy-classes';
import { Card, PageHeader } from '@/components/ui/primitives';

export const metadata: Metadata = { title: 'Project' };

export default async function ProjectPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { me, project } = await requireProjectPage(projectId);
  const admin = can(me.role, 'project.manage');
  const rows: [string, string][] = [
    ['Network owner', project.ownerOrgName],
    ['Contractor', project.contractorOrgName],
    ['Area', project.areaName || '—'],
    ['Default coordinate system', project.defaultCrs],
    ['Extent (W, S, E, N)', project.extent ? project.extent.map((v) => v.toFixed(5)).join(', ') : 'Not set yet'],
    ['Time zone', project.timeZone],
    ['Units shown', project.unitSystem === 'metric' ? 'Metric' : 'Imperial'],
    ['Minimum cover depth', formatLength(project.minCoverDepthM, project.unitSystem)],
    ['Lateral tolerance', formatLength(project.lateralToleranceM, project.unitSystem)],
    ['Default accuracy of uploads', ACCURACY_CLASS_LABELS[project.defaultAccuracyClass]],
  ];
  return (
    <>
      <PageHeader
        title={project.name}
        subtitle={project.areaName}
        actions={
          admin ? (
            <>
              <Link href={`/projects/${project.id}/settings`} className="rounded-md border border-ink/15 bg-paper-raised px-3.5 py-2 text-sm no-underline hover:no-underline">
                Settings
              </Link>
              <Link href={`/projects/${project.id}/activity`} className="rounded-md border border-ink/15 bg-paper-raised px-3.5 py-2 text-sm no-underline hover:no-underline">
                Activity log
              </Link>
            </>
          ) : undefined
        }
      />
      <Card title="Project settings">
        <dl className="grid gap-x-8 gap-y-3 sm:grid-cols-2">
          {rows.map(([k, v]) => (
            <div key={k}>
              <dt className="text-xs uppercase tracking-wide text-ink-faint">{k}</dt>
              <dd className="text-sm">{v}</dd>
            </div>
          ))}
        </dl>
      </Card>
    </>
  );
}
