import type { Metadata } from 'next';
import Link from 'next/link';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { formatLength } from '@/lib/records/units';
import { ACCURACY_CLASS_LABELS } from '@/lib/records/accuracy-classes';
import { Card, PageHeader } from '@/components/ui/primitives';

export const metadata: Metadata = { title: 'Project' };

export default async function ProjectPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { project } = await requireProjectPage(projectId);
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
          <Link href={`/projects/${project.id}/uploads`} className="rounded-md bg-brand px-3.5 py-2 text-sm font-medium text-white no-underline hover:bg-brand-dark hover:no-underline">
            Field uploads
          </Link>
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
