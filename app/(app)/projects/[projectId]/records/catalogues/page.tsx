import type { Metadata } from 'next';
import Link from 'next/link';
import { getDb } from '@/db/client';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { allDuctColours } from '@/lib/records/duct-colours';
import { projectCatalogues } from '@/lib/services/catalogues';
import { Badge, Card, PageHeader } from '@/components/ui/primitives';
import { DataTable, type Column, type Row } from '@/components/ui/data-table';
import { DuctSwatch } from '@/components/ui/duct-swatch';
import { BackfillMaterialAdd, CatalogueToggle, ColourSequenceAdd, DuctSizeAdd, UtilityKindAdd } from '@/components/forms/catalogue-editor';

export const metadata: Metadata = { title: 'Catalogues' };

const SIZE_COLUMNS: Column[] = [
  { key: 'size', label: 'Outer / inner' },
  { key: 'state', label: 'In the forms', priority: 1 },
  { key: 'common', label: 'Common' },
  { key: 'actions', label: '' },
];
const SEQUENCE_COLUMNS: Column[] = [
  { key: 'name', label: 'Sequence' },
  { key: 'used', label: 'Used by the project', priority: 1 },
  { key: 'standard', label: 'Standard' },
  { key: 'colours', label: 'Colours (then repeated with the marking)' },
];
const LIST_COLUMNS: Column[] = [
  { key: 'label', label: 'Label' },
  { key: 'state', label: 'In the forms', priority: 1 },
  { key: 'key', label: 'Key', priority: 3 },
  { key: 'actions', label: '' },
];

const state = (retired: boolean) => (retired ? { text: 'retired', tone: 'muted' as const } : { text: 'offered', tone: 'ok' as const });

/**
 * The project's four catalogues. The contractor's admins and engineers add and retire entries; everyone who
 * sees the project reads them. The project's colour sequence is chosen in its settings.
 */
export default async function CataloguesPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { me, project } = await requireProjectPage(projectId, 'record.read');
  const c = await projectCatalogues(getDb(), project);
  const canManage = can(me.role, 'catalogue.manage') && me.organisationId === project.contractorOrgId;
  const base = `/projects/${project.id}`;
  const api = `/api/projects/${project.id}/catalogues`;

  const sizeRows: Row[] = c.ductSizes.map((s) => ({
    id: s.id,
    cells: {
      size: { text: `${s.outerMm}/${s.innerMm} mm`, sort: s.outerMm * 1000 + s.innerMm },
      state: state(s.retired),
      common: s.common ? 'yes' : 'no',
      actions: canManage
        ? {
            text: '',
            node: (
              <span className="flex flex-wrap gap-2">
                <CatalogueToggle url={`${api}/duct-sizes/${s.id}`} body={{ retired: !s.retired }} label={s.retired ? 'Bring back' : 'Retire'} />
                <CatalogueToggle url={`${api}/duct-sizes/${s.id}`} body={{ common: !s.common }} label={s.common ? 'Not common' : 'Mark common'} />
              </span>
            ),
          }
        : '',
    },
  }));
  const sequenceRows: Row[] = c.colourSequences.map((s) => ({
    id: s.id,
    cells: {
      name: s.name,
      used: s.id === c.colourSequenceId ? { text: 'in use', tone: 'ok' } : '—',
      standard: s.standard || '—',
      colours: {
        text: s.colours.map((x) => x.name).join(', '),
        node: (
          <ol className="flex flex-wrap gap-x-3 gap-y-1">
            {allDuctColours(s).slice(0, s.colours.length).map((x) => (
              <li key={x.position}>
                <DuctSwatch label={x.label} hex={x.hex} position={x.position} />
              </li>
            ))}
            <li className="text-xs text-ink-soft">then with a {s.repeatMarking}</li>
          </ol>
        ),
      },
    },
  }));
  const listRows = (rows: { id: string; label: string; retired: boolean; key?: string }[], path: string): Row[] =>
    rows.map((r) => ({
      id: r.id,
      cells: {
        label: r.label,
        state: state(r.retired),
        key: r.key ?? '—',
        actions: canManage ? { text: '', node: <CatalogueToggle url={`${api}/${path}/${r.id}`} body={{ retired: !r.retired }} label={r.retired ? 'Bring back' : 'Retire'} /> } : '',
      },
    }));

  return (
    <>
      <PageHeader
        title="Catalogues"
        subtitle={
          <>
            The sizes, colours, utility kinds and materials this project&apos;s forms offer. Retired entries stay on the records that use them.{' '}
            <Link href={`${base}/records`} className="underline">All records</Link> · <Link href={`${base}/settings`} className="underline">Project settings</Link> (the colour sequence in use)
          </>
        }
      />
      {!canManage && (
        <p className="mb-4 text-sm text-ink-soft">
          <Badge tone="muted">read only</Badge> The contractor&apos;s admins and engineers keep the catalogues.
        </p>
      )}
      <div className="flex flex-col gap-6">
        <Card title="Duct sizes">
          <DataTable columns={SIZE_COLUMNS} rows={sizeRows} label="Duct sizes" />
          {canManage && <div className="mt-4"><DuctSizeAdd projectId={project.id} /></div>}
        </Card>
        <Card title="Colour sequences">
          <DataTable columns={SEQUENCE_COLUMNS} rows={sequenceRows} label="Colour sequences" />
          {canManage && <div className="mt-4"><ColourSequenceAdd projectId={project.id} /></div>}
        </Card>
        <Card title="Utility kinds">
          <DataTable columns={LIST_COLUMNS} rows={listRows(c.utilityKinds, 'utility-kinds')} label="Utility kinds" />
          {canManage && <div className="mt-4"><UtilityKindAdd projectId={project.id} /></div>}
        </Card>
        <Card title="Backfill materials">
          <DataTable columns={LIST_COLUMNS.filter((x) => x.key !== 'key')} rows={listRows(c.backfillMaterials, 'backfill-materials')} label="Backfill materials" />
          {canManage && <div className="mt-4"><BackfillMaterialAdd projectId={project.id} /></div>}
        </Card>
      </div>
    </>
  );
}
