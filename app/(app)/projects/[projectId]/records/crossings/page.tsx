import type { Metadata } from 'next';
import Link from 'next/link';
import { getDb } from '@/db/client';
import { listDuctSizes } from '@/db/catalogues';
import { listPlannedRoutes } from '@/db/planned';
import { listCrossingRoutes } from '@/db/road-crossings';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { PLANNED_COLOUR, STATUS_STYLE } from '@/lib/records/section-status';
import { formatQuantity, shownSystem } from '@/lib/records/units';
import { Badge, Card, PageHeader } from '@/components/ui/primitives';
import { DataTable, type Column, type Row } from '@/components/ui/data-table';
import { RoadCrossingForm } from '@/components/forms/road-crossing-form';
import { GeoMap, type MapLayer } from '@/components/map/geo-map';

export const metadata: Metadata = { title: 'Road crossings' };

const COLUMNS: Column[] = [
  { key: 'crossing', label: 'Crossing' },
  { key: 'status', label: 'Status', priority: 1 },
  { key: 'builtOn', label: 'Built on' },
  { key: 'length', label: 'Length (measured / planned)', align: 'right' },
  { key: 'sawn', label: 'Sawn before the lengthways cut' },
  { key: 'ducts', label: 'Ducts' },
  { key: 'address', label: 'Address', priority: 3 },
  { key: 'photos', label: 'Photos', align: 'right', priority: 3 },
];

/** Every crossing route of the plan, built or not, and the form to record one. */
export default async function CrossingsPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { me, project } = await requireProjectPage(projectId, 'record.read');
  const db = getDb();
  const [entries, sizes, lines] = await Promise.all([listCrossingRoutes(db, project.id), listDuctSizes(db, project.id), listPlannedRoutes(db, project.id, true)]);
  const system = shownSystem(me.unitSystem, project.unitSystem);
  const canWrite = can(me.role, 'record.write') && me.organisationId === project.contractorOrgId;
  const base = `/projects/${project.id}`;
  const built = entries.filter((e) => e.crossing?.built).length;

  // the streets faint, built crossings in the built colour, the rest dashed grey (never colour alone)
  const builtIds = new Set(entries.filter((e) => e.crossing?.built).map((e) => e.routeId));
  const crossingIds = new Set(entries.map((e) => e.routeId));
  const layer = (id: string, colour: string, keep: (r: (typeof lines)[number]) => boolean, extra: Partial<MapLayer> = {}): MapLayer => ({
    id, colour, ...extra,
    data: { type: 'FeatureCollection', features: lines.filter(keep).map((r) => ({ type: 'Feature', properties: { ref: r.ref }, geometry: { type: 'LineString', coordinates: r.coords } })) },
  });
  const layers: MapLayer[] = [
    layer('streets', PLANNED_COLOUR, (r) => r.kind === 'street' && r.removedInVersion === null, { width: 2 }),
    layer('not-built', STATUS_STYLE.not_built.colour, (r) => crossingIds.has(r.id) && !builtIds.has(r.id), { dashed: true, width: 4 }),
    layer('built', STATUS_STYLE.as_planned.colour, (r) => builtIds.has(r.id), { width: 5 }),
  ];

  const rows: Row[] = entries.map((e) => {
    const c = e.crossing;
    const status = e.routeRemoved
      ? { text: 'route removed from plan', tone: 'warn' as const }
      : c?.built
        ? { text: 'built', tone: 'ok' as const }
        : { text: c ? 'recorded, not built' : 'not built yet', tone: 'muted' as const };
    return {
      id: e.routeId,
      cells: {
        crossing: `${e.routeRef}${e.street ? ` · ${e.street}` : ''}`,
        status,
        builtOn: c?.builtOn ?? '—',
        length: { text: `${formatQuantity(c?.lengthM, 'length', system)} / ${formatQuantity(e.plannedLengthM, 'length', system)}`, sort: c?.lengthM ?? -1 },
        sawn: c?.sawnBeforeMain == null ? '—' : c.sawnBeforeMain ? 'yes' : { text: 'no, after', tone: 'warn' },
        ducts: c?.ductCount ? `${c.ductCount} × ${c.ductSize ?? 'size not recorded'}` : e.plannedDucts ? `planned ${e.plannedDucts}` : '—',
        address: c?.addressRef ?? '—',
        photos: c ? { text: String(c.photoCount), href: `${base}/records/photos?crossing=${c.id}`, sort: c.photoCount } : '—',
      },
    };
  });

  return (
    <>
      <PageHeader
        title="Road crossings"
        subtitle={<>The short cuts across the street to the houses, sawn before the lengthways cut. {built} of {entries.length} built. <Link href={`${base}/records`} className="underline">All records</Link></>}
      />
      <div className="flex flex-col gap-6">
        {entries.length > 0 && (
          <div>
            <GeoMap label="Map of the road crossings: built and not built" layers={layers} height={320} />
            <p className="text-xs text-ink-soft">
              <span style={{ color: STATUS_STYLE.as_planned.colour }}>━</span> built crossing · <span style={{ color: STATUS_STYLE.not_built.colour }}>┅</span> not built yet · <span style={{ color: PLANNED_COLOUR }}>━</span> street routes
            </p>
          </div>
        )}
        <DataTable columns={COLUMNS} rows={rows} label="Road crossings" empty="The plan has no road crossings: a design line whose type says crossing becomes one." />
        {canWrite && entries.some((e) => !e.routeRemoved) ? (
          <Card title="Record a crossing">
            <RoadCrossingForm
              projectId={project.id}
              system={system}
              ductSizes={sizes.filter((s) => !s.retired).map((s) => ({ id: s.id, label: `${s.outerMm}/${s.innerMm} mm` }))}
              crossings={entries.filter((e) => !e.routeRemoved).map((e) => ({ routeId: e.routeId, routeRef: e.routeRef, street: e.street, plannedDucts: e.plannedDucts, record: e.crossing }))}
            />
          </Card>
        ) : (
          !canWrite && <p className="text-sm text-ink-soft"><Badge tone="muted">read only</Badge> The contractor&apos;s surveyors and engineers record crossings.</p>
        )}
      </div>
    </>
  );
}
