import type { Metadata } from 'next';
import Link from 'next/link';
import { getDb } from '@/db/client';
import { listAddressImports } from '@/db/address-imports';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { Card, PageHeader } from '@/components/ui/primitives';
import { DataTable, type Column, type Row } from '@/components/ui/data-table';
import { AddressImport } from '@/components/forms/address-import';
import { plural } from '@/components/ui/upload-words';

export const metadata: Metadata = { title: 'Address register imports' };

const COLUMNS: Column[] = [
  { key: 'file', label: 'File' },
  { key: 'when', label: 'Imported', priority: 1 },
  { key: 'by', label: 'By' },
  { key: 'counts', label: 'Addresses' },
  { key: 'kind', label: 'Kind', priority: 3 },
  { key: 'original', label: 'Original' },
];

/** The address register's import (admins and engineers) and the list of past imports (everyone). */
export default async function AddressImportPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { me, project } = await requireProjectPage(projectId, 'address.read');
  const imports = await listAddressImports(getDb(), project.id);
  const rows: Row[] = imports.map((i) => ({
    id: i.id,
    cells: {
      file: i.fileName,
      when: { text: new Date(i.createdAt).toLocaleString('en-GB', { timeZone: project.timeZone }), sort: i.createdAt },
      by: i.importedByName ?? '—',
      counts: `${plural(i.counts.rows, 'address', 'addresses')}: ${i.counts.added} added, ${i.counts.changed} changed, ${i.counts.removed} removed, ${i.counts.restored} restored, ${i.counts.unchanged} unchanged`,
      kind: `${i.partial ? 'partial' : 'whole register'} · ${i.format === 'shapefile' ? 'shapefile' : i.format.toUpperCase()}, ${i.crs}`,
      original: {
        text: 'Download',
        node: (
          <a className="text-brand underline" href={`/api/address-imports/${i.id}/original`} download={i.fileName}>
            Download
          </a>
        ),
      },
    },
  }));
  return (
    <>
      <PageHeader
        title="Address register imports"
        subtitle={
          <>
            The addresses the network is built to pass. <Link className="text-brand underline" href={`/projects/${project.id}/households`}>Back to households</Link>
          </>
        }
      />
      <div className="space-y-6">
        {can(me.role, 'address.import') && (
          <Card title="Import the address register">
            <AddressImport projectId={project.id} />
          </Card>
        )}
        <DataTable label="Past imports" empty="No address register imported yet." columns={COLUMNS} rows={rows} />
      </div>
    </>
  );
}
