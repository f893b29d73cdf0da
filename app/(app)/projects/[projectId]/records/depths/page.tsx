import type { Metadata } from 'next';
import Link from 'next/link';
import { getDb } from '@/db/client';
import { listDepthReadings } from '@/db/depth-readings';
import { listAnchorRoutes } from '@/db/record-anchors';
import { listUploads } from '@/db/uploads';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { complianceCounts, coverCompliance } from '@/lib/records/depth-compliance';
import { formatInZone } from '@/lib/records/zoned-time';
import { formatQuantity, shownSystem } from '@/lib/records/units';
import { Badge, Card, PageHeader } from '@/components/ui/primitives';
import { Cautions } from '@/components/ui/cautions';
import { DataTable, type Column, type Row } from '@/components/ui/data-table';
import { DepthPlot } from '@/components/charts/depth-plot';
import { DepthReadingForm } from '@/components/forms/depth-reading-form';
import { DepthImport } from '@/components/forms/depth-import';
import { TakeFromUpload } from '@/components/forms/take-from-upload';

export const metadata: Metadata = { title: 'Depth readings' };

const COLUMNS: Column[] = [
  { key: 'place', label: 'Route and chainage' },
  { key: 'check', label: 'Cover check', priority: 1 },
  { key: 'cover', label: 'Cover', align: 'right' },
  { key: 'depth', label: 'Trench depth', align: 'right' },
  { key: 'offset', label: 'Offset', align: 'right', priority: 3 },
  { key: 'measured', label: 'Measured' },
  { key: 'source', label: 'From', priority: 3 },
  { key: 'note', label: 'Note', priority: 3 },
];
const SOURCE = { typed: 'typed', csv: 'CSV import', upload: 'upload attribute' } as const;

/** Every depth reading with its cover check, a plot per route, the typed form and the CSV import. */
export default async function DepthsPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { me, project } = await requireProjectPage(projectId, 'record.read');
  const db = getDb();
  const [readings, routes, uploads] = await Promise.all([listDepthReadings(db, project.id), listAnchorRoutes(db, project.id), listUploads(db, project.id)]);
  const stored = uploads.filter((u) => u.status === 'stored').map((u) => ({ id: u.id, label: `${u.fileName} (${u.createdAt.slice(0, 10)})` }));
  const system = shownSystem(me.unitSystem, project.unitSystem);
  const canWrite = can(me.role, 'record.write') && me.organisationId === project.contractorOrgId;
  const min = project.minCoverDepthM;
  const counts = complianceCounts(readings, min);
  const base = `/projects/${project.id}`;
  const rows: Row[] = readings.map((r) => {
    const c = coverCompliance(r.coverM, min);
    return {
      id: r.id,
      cells: {
        place: { text: `${r.routeRef} · ${formatQuantity(r.chainageM, 'length', system)}`, sort: `${r.routeRef} ${r.chainageM.toFixed(1).padStart(10, '0')}` },
        check: r.routeRemoved
          ? { text: 'route removed from plan', tone: 'warn' }
          : c === 'fail' ? { text: 'below minimum', tone: 'bad' } : c === 'pass' ? { text: 'ok', tone: 'ok' } : { text: 'no cover measured', tone: 'muted' },
        cover: { text: formatQuantity(r.coverM, 'depth', system), sort: r.coverM ?? -1 },
        depth: { text: formatQuantity(r.trenchDepthM, 'depth', system), sort: r.trenchDepthM ?? -1 },
        offset: { text: formatQuantity(r.offsetM, 'depth', system), sort: r.offsetM },
        measured: r.measuredAt ? formatInZone(r.measuredAt, project.timeZone).slice(0, 16) : '—',
        source: `${SOURCE[r.source]}${r.sourceRow ? `, row ${r.sourceRow}` : ''}`,
        note: r.note || '—',
      },
    };
  });
  const byRoute = [...new Set(readings.map((r) => r.routeRef))];
  return (
    <>
      <PageHeader
        title="Depth readings"
        subtitle={<>Cover against the project&apos;s minimum of {formatQuantity(min, 'depth', system)}: {counts.pass} ok, {counts.fail} below, {counts.unknown} without a cover. <Link href={`${base}/records`} className="underline">All records</Link></>}
      />
      <div className="flex flex-col gap-6">
        <Cautions kinds={['digging']} />
        {byRoute.map((ref) => {
          const these = readings.filter((r) => r.routeRef === ref);
          const route = routes.find((x) => x.ref === ref);
          return (
            <Card key={ref} title={`${ref}${route?.street ? ` · ${route.street}` : ''}`}>
              <DepthPlot readings={these} minCoverM={min} system={system} fromM={0} toM={route?.lengthM ?? these[these.length - 1].chainageM} />
            </Card>
          );
        })}
        <DataTable columns={COLUMNS} rows={rows} label="Depth readings" empty="No depth readings yet: type one below or import a CSV." />
        {canWrite ? (
          <>
            <Card title="Type a reading">
              <DepthReadingForm projectId={project.id} system={system} minCoverM={min} routes={routes.filter((r) => !r.removed).map((r) => ({ id: r.id, ref: r.ref, street: r.street, lengthM: r.lengthM }))} />
            </Card>
            <Card title="Import readings from a CSV">
              <DepthImport projectId={project.id} system={system} />
            </Card>
            <Card title="Take readings from an upload">
              <TakeFromUpload projectId={project.id} path="depth-readings/from-upload" uploads={stored} field="attribute" label="Attribute holding the cover (m)" hint="A depth column of a shapefile, a GeoJSON property, or the depth column mapped in a survey CSV (named depth)." placeholder="depth" submitLabel="Take the readings" what={['reading', 'readings']} />
            </Card>
          </>
        ) : (
          <p className="text-sm text-ink-soft"><Badge tone="muted">read only</Badge> The contractor&apos;s surveyors and engineers record depths.</p>
        )}
      </div>
    </>
  );
}
