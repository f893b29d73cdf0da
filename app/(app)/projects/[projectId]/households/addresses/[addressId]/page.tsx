import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { getDb } from '@/db/client';
import { getAddress } from '@/db/addresses';
import { listAddressHistory, type AddressHistoryEntry } from '@/db/households';
import { listPlannedRoutes } from '@/db/planned';
import { getRoadCrossing } from '@/db/road-crossings';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { PASSED_DEFINITION } from '@/lib/households/passed';
import { pointAtChainage } from '@/lib/matching/chainage';
import { PLANNED_COLOUR } from '@/lib/records/section-status';
import { formatQuantity, shownSystem } from '@/lib/records/units';
import { Badge, Card, PageHeader } from '@/components/ui/primitives';
import { DataTable, type Column, type Row } from '@/components/ui/data-table';
import { GeoMap, type MapLayer } from '@/components/map/geo-map';
import { ConnectAddressForm } from '@/components/forms/connect-address-form';

export const metadata: Metadata = { title: 'Address' };

const HISTORY_COLUMNS: Column[] = [
  { key: 'at', label: 'When' },
  { key: 'change', label: 'Change' },
  { key: 'detail', label: 'What changed', priority: 2 },
  { key: 'by', label: 'By', priority: 3 },
];

const CHANGE_WORDS: Record<AddressHistoryEntry['change'], string> = {
  added: 'added', changed: 'changed', removed: 'removed', restored: 'restored', connected: 'drop installed', disconnected: 'drop taken back',
};

function detailOf(h: AddressHistoryEntry): string {
  if (!h.before || !h.after) return h.importFileName ? `import ${h.importFileName}` : '—';
  const keys = [...new Set([...Object.keys(h.before), ...Object.keys(h.after)])].filter((k) => JSON.stringify(h.before![k]) !== JSON.stringify(h.after![k]));
  return keys.map((k) => `${k}: ${JSON.stringify(h.before![k] ?? null)} → ${JSON.stringify(h.after![k] ?? null)}`).join('; ') || '—';
}

/** One address: how its serving route was found, its side and foot point, passed or not and why, its drop and its history. */
export default async function AddressPage({ params }: { params: Promise<{ projectId: string; addressId: string }> }) {
  const { projectId, addressId } = await params;
  const { me, project } = await requireProjectPage(projectId, 'address.read');
  const db = getDb();
  const a = await getAddress(db, addressId);
  if (!a || a.projectId !== project.id) notFound();
  const [history, routes, crossing] = await Promise.all([
    listAddressHistory(db, a.id),
    listPlannedRoutes(db, project.id),
    a.passedViaCrossingId ? getRoadCrossing(db, a.passedViaCrossingId) : Promise.resolve(undefined),
  ]);
  const system = shownSystem(me.unitSystem, project.unitSystem);
  const base = `/projects/${project.id}`;
  const h = project.households;
  const route = routes.find((r) => r.id === a.servingRouteId);
  const canConnect = can(me.role, 'address.connect') && me.organisationId === project.contractorOrgId && !a.removed;

  const how = {
    design: "the design's assignment (from the address import)",
    street: `the nearest route along its own street (${a.street}) within ${formatQuantity(h.serveDistanceM, 'length', system)}`,
    nearest: `the nearest street route of any name: no route of its street's name lies within ${formatQuantity(h.serveDistanceM, 'length', system)}`,
  };
  const foot = route && a.footChainageM !== null ? pointAtChainage(route.coords, a.footChainageM) : null;
  const layers: MapLayer[] = [];
  if (route) layers.push({ id: 'route', colour: PLANNED_COLOUR, width: 4, data: { type: 'FeatureCollection', features: [{ type: 'Feature', properties: { ref: route.ref }, geometry: { type: 'LineString', coordinates: route.coords } }] } });
  if (foot) layers.push({ id: 'foot', colour: '#555555', dashed: true, width: 2, data: { type: 'FeatureCollection', features: [{ type: 'Feature', properties: {}, geometry: { type: 'LineString', coordinates: [[a.lon, a.lat], foot] } }] } });
  layers.push({ id: 'address', colour: a.passed ? '#009e73' : '#d55e00', hollow: !a.passed, pointRadius: 6, data: { type: 'FeatureCollection', features: [{ type: 'Feature', properties: { key: a.key }, geometry: { type: 'Point', coordinates: [a.lon, a.lat] } }] } });

  const rows: Row[] = history.map((e) => ({
    id: String(e.id),
    cells: { at: e.at.slice(0, 16).replace('T', ' '), change: CHANGE_WORDS[e.change], detail: detailOf(e), by: e.changedByName ?? (e.importFileName ? 'import' : '—') },
  }));

  const fact = (label: string, value: React.ReactNode) => (
    <div className="flex flex-col gap-0.5 sm:flex-row sm:gap-3">
      <dt className="text-sm text-ink-soft sm:w-48 sm:shrink-0">{label}</dt>
      <dd className="text-sm">{value}</dd>
    </div>
  );

  return (
    <>
      <PageHeader
        title={`${a.street} ${a.number}`.trim() || a.key}
        subtitle={<>Address {a.key}{a.postcode || a.locality ? ` · ${[a.postcode, a.locality].filter(Boolean).join(' ')}` : ''}. <Link href={`${base}/households`} className="underline">All addresses</Link></>}
      />
      <div className="flex flex-col gap-6">
        {a.removed && <p className="text-sm"><Badge tone="warn">removed</Badge> A later import removed this address from the register: it is kept with its history and counted nowhere.</p>}
        <Card title="Passed">
          <dl className="flex flex-col gap-2">
            {fact('Status', a.passed ? <Badge tone="ok">passed</Badge> : <Badge tone="bad">not passed</Badge>)}
            {!a.passed && a.notPassedReason && fact('Why not', a.notPassedReason)}
            {a.passed && fact('Approved', a.passedApproved ? <Badge tone="ok">every section that passes it is approved</Badge> : <Badge tone="warn">not yet: a section that passes it awaits approval</Badge>)}
            {crossing && fact('Across the street by', <>road crossing {crossing.routeRef}{crossing.builtOn ? `, built ${crossing.builtOn}` : ''} (<Link href={`${base}/records/crossings`} className="underline">crossings</Link>)</>)}
            {fact('Households (units)', a.units)}
            {fact('Building type', a.buildingType || '—')}
            {fact('Worked out', a.computedAt ? a.computedAt.slice(0, 16).replace('T', ' ') + ' UTC' : 'not yet')}
          </dl>
        </Card>
        <Card title="Serving route">
          <dl className="flex flex-col gap-2">
            {fact('Route', route ? `${route.ref}${route.street ? ` · ${route.street}` : ''}` : 'none')}
            {a.servingBy && fact('Found by', how[a.servingBy])}
            {fact('Side of the street', a.side === 'across' ? 'across the street from the trench' : a.side === 'route' ? 'on the trench side' : '—')}
            {fact('Foot point', a.footChainageM === null ? '—' : `chainage ${formatQuantity(a.footChainageM, 'length', system)} on ${route?.ref ?? '—'}`)}
            {fact('Distance to the foot point', formatQuantity(a.distanceM, 'length', system))}
            {a.designRouteRef && fact('Design assignment', `${a.designRouteRef}${a.designSide ? `, ${a.designSide === 'across' ? 'across' : 'route side'}` : ''}`)}
          </dl>
          {layers.length > 1 && <GeoMap label={`Map: address ${a.key}, its foot point and its serving route`} layers={layers} height={260} />}
        </Card>
        <Card title="Drop">
          <p className="mb-3 text-sm">
            {a.connected ? <><Badge tone="ok">installed</Badge> {a.connectedOn ? `on ${a.connectedOn}` : ''} ({a.connectedSource === 'import' ? 'from the address import' : 'recorded by hand'})</> : <Badge tone="muted">not installed</Badge>}
          </p>
          {canConnect ? (
            <ConnectAddressForm projectId={project.id} addressId={a.id} connected={a.connected} connectedOn={a.connectedOn} />
          ) : (
            <p className="text-sm text-ink-soft"><Badge tone="muted">read only</Badge> The contractor&apos;s surveyors, engineers and administrators record drops as installed.</p>
          )}
        </Card>
        <Card title="History">
          <DataTable columns={HISTORY_COLUMNS} rows={rows} label="History of the address" empty="No history yet." />
        </Card>
        <Card title="How passed is decided">
          <div className="flex flex-col gap-2 text-sm text-ink-soft">
            {PASSED_DEFINITION.split('\n\n').map((p) => <p key={p.slice(0, 24)}>{p}</p>)}
          </div>
        </Card>
      </div>
    </>
  );
}
