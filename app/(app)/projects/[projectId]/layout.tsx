import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { NavLinks } from '@/components/nav/nav-links';

export default async function ProjectLayout({ children, params }: { children: React.ReactNode; params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { me, project } = await requireProjectPage(projectId);
  const base = `/projects/${project.id}`;
  const items = [
    { href: `${base}/plan`, label: 'Planned network' },
    { href: `${base}/uploads`, label: 'Uploads' },
    { href: `${base}/reconciliation`, label: 'Planned against built' },
    { href: `${base}/records`, label: 'Trench records' },
    { href: `${base}/checks`, label: 'Quality checks' },
    { href: `${base}/households`, label: 'Households' },
    { href: `${base}/handover`, label: 'Handover' },
  ];
  if (can(me.role, 'project.manage')) items.push({ href: `${base}/settings`, label: 'Settings' });
  if (can(me.role, 'audit.read')) items.push({ href: `${base}/activity`, label: 'Activity log' });
  return (
    <div>
      <div className="mb-6 flex items-center gap-3 border-b border-ink/10 pb-3">
        <a href={base} className="max-w-[40%] shrink-0 truncate text-sm font-semibold text-ink sm:max-w-xs" title={project.name}>
          {project.name}
        </a>
        <NavLinks items={items} label="Project" />
      </div>
      {children}
    </div>
  );
}
