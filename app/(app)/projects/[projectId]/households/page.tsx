import type { Metadata } from 'next';
import Link from 'next/link';
import type { FeatureCollection } from 'geojson';
import { getDb } from '@/db/client';
import { listAddresses, type Address } from '@/db/addresses';
import { listProgress } from '@/db/households';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { PASSED_DEFINITION } from '@/lib/households/passed';
import { addressCounts } from '@/lib/services/address-export';
import { Card, PageHeader } from '@/components/ui/primitives';
import { GeoMap, type MapLayer } from '@/components/map/geo-map';
import { HouseholdsChart } from '@/components/charts/households-chart';
import { HouseholdsTable, type HouseholdRow } from '@/components/forms/households-table';

export const metadata: Metadata = { title: 'Households' };

// Okabe–Ito colours (distinguishable under the common colour-vision deficiencies), and a shape each:
// passed a filled dot, not passed a hollow ring, connected a larger filled dot
const STYLE = {
  connected: { label: 'connected', colour: '#0072b2', radius: 6, hollow: false },
  passed: { label: 'passed', colour: '#009e73', radius: 4, hollow: false },
  not_passed: { label: 'not passed', colour: '#d55e00', radius: 4, hollow: true },
} as const;
type MapStatus = keyof typeof STYLE;
const statusOf = (a: Address): MapStatus => (a.connected ? 'connected' : a.passed ? 'passed' : 'not_passed');
const SIDE = { route: 'route side', across: 'across' } as const;

const share = (part: number, whole: number) => (whole === 0 ? '—' : `${((part / whole) * 100).toFixed(1)} %`);

function Tile({ label, value, note }: { label: string; value: string | number; note?: string }) {
  return (
    <div className="rounded-lg border border-ink/10 bg-paper-raised p-3" role="group" aria-label={label}>
      <p className="text-xs font-semibold uppercase tracking-wide text-ink-faint">{label}</p>
      <p className="text-2xl font-semibold tabular-nums" data-figure>{value}</p>
      {note && <p className="text-xs text-ink-soft">{note}</p>}
    </div>
  );
}

/** Households passed and connected: the counts, the daily progress, a map and a table of the register. */
export default async function HouseholdsPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { me, project } = await requireProjectPage(projectId, 'address.read');
  const db = getDb();
  const [addresses, progress] = await Promise.all([listAddresses(db, project.id), listProgress(db, project.id)]);
  const c = addressCounts(addresses);
  const base = `/projects/${project.id}/households`;
  const api = `/api/projects/${project.id}/addresses`;
  const importer = can(me.role, 'address.import');

  const byStatus = { connected: [] as Address[], passed: [] as Address[], not_passed: [] as Address[] };
  for (const a of addresses) byStatus[statusOf(a)].push(a);
  const layers: MapLayer[] = (['not_passed', 'passed', 'connected'] as const).map((st) => ({
    id: `addresses-${st}`,
    colour: STYLE[st].colour,
    pointRadius: STYLE[st].radius,
    hollow: STYLE[st].hollow,
    data: {
      type: 'FeatureCollection',
      features: byStatus[st].map((a) => ({ type: 'Feature', id: a.key, properties: { key: a.key }, geometry: { type: 'Point', coordinates: [a.lon, a.lat] } })),
    } satisfies FeatureCollection,
  }));

  const rows: HouseholdRow[] = addresses.map((a) => {
    const st = statusOf(a);
    return {
      id: a.id,
      street: a.street,
      passed: a.passed,
      connected: a.connected,
      cells: {
        address: { text: `${a.street} ${a.number}`.trim() || a.key, href: `${base}/addresses/${a.id}`, sort: `${a.street}|${String(a.number).padStart(8, '0')}` },
        status: { text: a.passed && a.connected ? 'passed, connected' : a.passed && a.passedApproved ? 'passed, approved' : STYLE[st].label, swatch: STYLE[st].colour },
        units: a.units,
        route: a.servingRouteRef ?? '—',
        side: a.side ? SIDE[a.side] : '—',
        reason: a.notPassedReason ?? '',
        key: a.key,
      },
    };
  });
  const streets = [...new Set(addresses.map((a) => a.street))].sort((x, y) => x.localeCompare(y));
  const chart = progress.map((p) => ({ day: p.day, served: p.householdsServed, passed: p.householdsPassed, approved: p.householdsPassedApproved, connected: p.householdsConnected }));
  const last = progress.at(-1);
  const chartSummary = last
    ? `${progress.length} day${progress.length === 1 ? '' : 's'} recorded, from ${progress[0].day} to ${last.day}: on the last, ${last.householdsPassed} of ${last.householdsServed} served households passed, ${last.householdsPassedApproved} approved, ${last.householdsConnected} connected.`
    : 'No day recorded yet: the households job writes one row a day when it runs.';

  return (
    <>
      <PageHeader
        title="Households"
        subtitle="Addresses passed and connected, derived from the plan, the built sections and the road crossings; never typed."
        actions={importer ? <Link href={`${base}/import`} className="inline-flex min-h-10 items-center rounded-md bg-brand px-3.5 text-sm font-medium text-white">Import addresses</Link> : undefined}
      />
      <div className="flex flex-col gap-6">
        {addresses.length === 0 ? (
          <Card title="The address register is empty">
            <p className="text-sm">
              Nothing is counted until the addresses are imported: a CSV (longitude and latitude, or projected coordinates with their EPSG code), GeoJSON points or a zipped shapefile of points, with a key, street, house number and the number of households in each building.
              {importer ? (
                <> <Link href={`${base}/import`} className="underline">Import the address register</Link>; the preview shows every row that fails before anything is stored.</>
              ) : (
                <> An engineer or admin of the project imports them.</>
              )}
            </p>
          </Card>
        ) : (
          <>
            <section aria-label="Counts" className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-4">
              <Tile label="Addresses" value={c.addresses} />
              <Tile label="Households" value={c.households} note="units in the buildings" />
              <Tile label="Households passed" value={c.householdsPassed} note={`${c.addressesPassed} addresses passed`} />
              <Tile label="Passed and approved" value={c.householdsPassedApproved} note={`${c.addressesPassedApproved} addresses`} />
              <Tile label="Connected" value={c.addressesConnected} note={`addresses; ${c.householdsConnected} households`} />
              <Tile label="Share of the plan" value={share(c.householdsPassed, c.householdsServed)} note={`households passed of ${c.householdsServed} served by the plan`} />
            </section>
            <Card title="Progress by day">
              {chart.length > 0 ? <HouseholdsChart data={chart} summary={chartSummary} /> : <p className="text-sm text-ink-soft">{chartSummary}</p>}
            </Card>
            <div>
              <GeoMap label="Map of the addresses by status" layers={layers} height={420} />
              <ul className="mt-2 flex flex-wrap gap-4 text-xs" aria-label="Legend">
                {(['passed', 'not_passed', 'connected'] as const).map((st) => (
                  <li key={st} className="flex items-center gap-1.5">
                    <span
                      aria-hidden="true"
                      data-swatch={STYLE[st].colour}
                      className="inline-block rounded-full"
                      style={{ width: STYLE[st].radius * 2, height: STYLE[st].radius * 2, ...(STYLE[st].hollow ? { border: `2px solid ${STYLE[st].colour}`, background: '#fff' } : { background: STYLE[st].colour }) }}
                    />
                    {STYLE[st].label} ({byStatus[st].length})
                  </li>
                ))}
              </ul>
            </div>
            <Card
              title="Addresses"
              actions={
                <span className="flex flex-wrap gap-3 text-sm">
                  <a href={`${api}?format=csv`}>Download CSV</a>
                  <a href={`${api}?format=xlsx`}>Download Excel</a>
                  <a href={`${api}?format=geojson`}>Download GeoJSON</a>
                </span>
              }
            >
              <HouseholdsTable rows={rows} streets={streets} />
            </Card>
          </>
        )}
        <details className="rounded-lg border border-status-info/40 bg-status-info/5 p-4 text-sm">
          <summary className="cursor-pointer font-semibold">When is an address passed?</summary>
          <div className="mt-2 space-y-2">
            {PASSED_DEFINITION.split('\n\n').map((p) => (
              <p key={p.slice(0, 40)}>{p}</p>
            ))}
            <p className="text-ink-soft">
              Distances are project settings: serve {project.households.serveDistanceM} m, crossing {project.households.crossingServeDistanceM} m, foot tolerance {project.households.footToleranceM} m.
            </p>
          </div>
        </details>
      </div>
    </>
  );
}
