import type { Metadata } from 'next';
import Link from 'next/link';
import { getDb } from '@/db/client';
import { listProjectsForOrganisation } from '@/db/projects';
import { requirePrincipal } from '@/lib/auth/session';
import { can } from '@/lib/auth/roles';
import { DataTable } from '@/components/ui/data-table';
import { PageHeader } from '@/components/ui/primitives';

export const metadata: Metadata = { title: 'Projects' };

export default async function ProjectsPage() {
  const me = await requirePrincipal();
  const projects = await listProjectsForOrganisation(getDb(), me.organisationId);
  return (
    <>
      <PageHeader
        title="Projects"
        subtitle={`Networks ${me.organisationName} owns or builds.`}
        actions={
          can(me.role, 'project.manage') ? (
            <Link href="/projects/new" className="rounded-md bg-brand px-3.5 py-2 text-sm font-medium text-white no-underline hover:bg-brand-dark hover:no-underline">
              New project
            </Link>
          ) : undefined
        }
      />
      <DataTable
        label="Projects"
        empty={can(me.role, 'project.manage') ? 'No projects yet. Create the first one.' : 'No projects are shared with your organisation yet.'}
        columns={[
          { key: 'name', label: 'Project' },
          { key: 'area', label: 'Area' },
          { key: 'owner', label: 'Network owner' },
          { key: 'contractor', label: 'Contractor' },
          { key: 'crs', label: 'Coordinate system' },
          { key: 'created', label: 'Created' },
        ]}
        rows={projects.map((p) => ({
          id: p.id,
          cells: {
            name: { text: p.name, href: `/projects/${p.id}` },
            area: p.areaName,
            owner: p.ownerOrgName,
            contractor: p.contractorOrgName,
            crs: p.defaultCrs,
            created: { text: new Date(p.createdAt).toLocaleDateString('en-GB'), sort: p.createdAt },
          },
        }))}
      />
    </>
  );
}
