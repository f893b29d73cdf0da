import type { Metadata } from 'next';
import Link from 'next/link';
import { listUtilityKinds } from '@/db/catalogues';
import { getDb } from '@/db/client';
import { listAnchorRoutes } from '@/db/record-anchors';
import { listTestPits, listUtilityCrossings } from '@/db/test-pits';
import { listUploads } from '@/db/uploads';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { clearanceStatus } from '@/lib/records/utility-clearance';
import { formatQuantity, shownSystem } from '@/lib/records/units';
import { Badge, Card, PageHeader } from '@/components/ui/primitives';
import { Cautions } from '@/components/ui/cautions';
import { DataTable, type Column, type Row } from '@/components/ui/data-table';
import { TestPitForm, UtilityCrossingForm } from '@/components/forms/test-pit-forms';
import { TakeFromUpload } from '@/components/forms/take-from-upload';

export const metadata: Metadata = { title: 'Test pits and utilities' };

const PIT_COLUMNS: Column[] = [
  { key: 'pit', label: 'Pit' },
  { key: 'place', label: 'Route and chainage', priority: 1 },
  { key: 'dugOn', label: 'Dug on' },
  { key: 'method', label: 'How' },
  { key: 'depth', label: 'Depth', align: 'right' },
  { key: 'utilities', label: 'Utilities found', align: 'right' },
  { key: 'findings', label: 'Findings', priority: 3 },
];
const CROSSING_COLUMNS: Column[] = [
  { key: 'utility', label: 'Utility' },
  { key: 'clearanceCheck', label: 'Clearance check', priority: 1 },
  { key: 'place', label: 'Route and chainage' },
  { key: 'depth', label: 'Depth to its top', align: 'right' },
  { key: 'clearance', label: 'Clearance to our ducts', align: 'right' },
  { key: 'method', label: 'Found by' },
  { key: 'foundOn', label: 'Found on', priority: 3 },
  { key: 'pit', label: 'Pit', priority: 3 },
  { key: 'note', label: 'Note', priority: 3 },
];
const PIT_METHOD = { hand_dug: 'by hand', vacuum: 'vacuum', other: 'other' } as const;
const FOUND_BY = { gpr: 'radar (GPR)', test_pit: 'test pit', records: 'records', other: 'other' } as const;

/** Test pits and the utilities found by them or by radar, with clearance warnings and the forms. */
export default async function PitsPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { me, project } = await requireProjectPage(projectId, 'record.read');
  const db = getDb();
  const [pits, crossings, routes, kinds, uploads] = await Promise.all([listTestPits(db, project.id), listUtilityCrossings(db, project.id), listAnchorRoutes(db, project.id), listUtilityKinds(db, project.id), listUploads(db, project.id)]);
  const stored = uploads.filter((u) => u.status === 'stored').map((u) => ({ id: u.id, label: `${u.fileName} (${u.createdAt.slice(0, 10)})` }));
  const system = shownSystem(me.unitSystem, project.unitSystem);
  const canWrite = can(me.role, 'record.write') && me.organisationId === project.contractorOrgId;
  const min = project.records.minClearanceM;
  const base = `/projects/${project.id}`;
  const place = (r: { routeRef: string; chainageM: number }) => ({ text: `${r.routeRef} · ${formatQuantity(r.chainageM, 'length', system)}`, sort: `${r.routeRef} ${r.chainageM.toFixed(1).padStart(10, '0')}` });
  const pitRows: Row[] = pits.map((p) => ({
    id: p.id,
    cells: {
      pit: p.routeRemoved ? { text: `${p.name || 'unnamed'} (route removed from plan)`, tone: 'warn' } : p.name || 'unnamed',
      place: place(p),
      dugOn: p.dugOn ?? '—',
      method: PIT_METHOD[p.method],
      depth: { text: formatQuantity(p.depthM, 'depth', system), sort: p.depthM ?? -1 },
      utilities: p.crossingCount,
      findings: p.findings || '—',
    },
  }));
  const below = crossings.filter((c) => clearanceStatus(c.clearanceM, min) === 'below_minimum').length;
  const crossingRows: Row[] = crossings.map((c) => {
    const s = clearanceStatus(c.clearanceM, min);
    return {
      id: c.id,
      cells: {
        utility: `${c.utilityLabel}${c.owner ? ` · ${c.owner}` : ''}`,
        clearanceCheck: c.routeRemoved ? { text: 'route removed from plan', tone: 'warn' } : s === 'below_minimum' ? { text: 'below minimum', tone: 'bad' } : s === 'ok' ? { text: 'ok', tone: 'ok' } : { text: 'not measured', tone: 'muted' },
        place: place(c),
        depth: { text: formatQuantity(c.depthM, 'depth', system), sort: c.depthM ?? -1 },
        clearance: { text: formatQuantity(c.clearanceM, 'depth', system), sort: c.clearanceM ?? -1 },
        method: FOUND_BY[c.method],
        foundOn: c.foundOn ?? '—',
        pit: c.pitName ?? (c.pitId ? 'unnamed pit' : '—'),
        note: c.note || '—',
      },
    };
  });
  const routeOptions = routes.filter((r) => !r.removed).map((r) => ({ id: r.id, ref: r.ref, street: r.street, lengthM: r.lengthM }));
  return (
    <>
      <PageHeader
        title="Test pits and utilities"
        subtitle={<>Pits dug to confirm what lies in the ground before sawing, and the utilities found by them or by radar. {pits.length} pit{pits.length === 1 ? '' : 's'}, {crossings.length} utilit{crossings.length === 1 ? 'y' : 'ies'}. <Link href={`${base}/records`} className="underline">All records</Link></>}
      />
      <div className="flex flex-col gap-6">
        <Cautions kinds={['digging']} />
        <h2 className="text-lg font-semibold">Test pits</h2>
        <DataTable columns={PIT_COLUMNS} rows={pitRows} label="Test pits" empty="No test pits yet. Pits also come from an upload's waypoints or survey points coded as pits." />
        <h2 className="text-lg font-semibold">Utilities found</h2>
        <Cautions kinds={['utilities']} />
        <p className="text-sm">
          Minimum vertical clearance to our ducts: {formatQuantity(min, 'depth', system)}.{' '}
          {below > 0 ? <Badge tone="bad">{below} below the minimum</Badge> : <Badge tone="ok">none below the minimum</Badge>}
        </p>
        <DataTable columns={CROSSING_COLUMNS} rows={crossingRows} label="Utilities found" empty="No utilities recorded yet." />
        {canWrite ? (
          <div className="grid gap-6 lg:grid-cols-2">
            <Card title="Add a test pit">
              <TestPitForm projectId={project.id} routes={routeOptions} system={system} />
            </Card>
            <Card title="Add a utility found">
              <UtilityCrossingForm
                projectId={project.id}
                routes={routeOptions}
                system={system}
                minClearanceM={min}
                kinds={kinds.filter((k) => !k.retired).map((k) => ({ id: k.id, label: k.label }))}
                pits={pits.map((p) => ({ id: p.id, label: `${p.name || 'unnamed pit'} · ${p.routeRef} ${formatQuantity(p.chainageM, 'length', system)}` }))}
              />
            </Card>
            <Card title="Take pits from an upload">
              <TakeFromUpload projectId={project.id} path="test-pits/from-upload" uploads={stored} field="code" label="Code that marks a pit" hint="A survey point's code, or a GPX waypoint's type or name (PIT, PIT 3, PIT-04)." placeholder="PIT" submitLabel="Take the pits" what={['test pit', 'test pits']} />
            </Card>
          </div>
        ) : (
          <p className="text-sm text-ink-soft"><Badge tone="muted">read only</Badge> The contractor&apos;s surveyors and engineers record pits and utilities.</p>
        )}
      </div>
    </>
  );
}
