import type { Metadata } from 'next';
import Link from 'next/link';
import { getDb } from '@/db/client';
import { colourSequenceOfProject, listDuctSizes } from '@/db/catalogues';
import { listDuctBundles, listDuctJoints } from '@/db/duct-bundles';
import { listAnchorRoutes } from '@/db/record-anchors';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { allDuctColours } from '@/lib/records/duct-colours';
import { formatQuantity, shownSystem } from '@/lib/records/units';
import { ductContinuity } from '@/lib/services/duct-bundles';
import { Badge, Card, Notice, PageHeader } from '@/components/ui/primitives';
import { DataTable, type Column, type Row } from '@/components/ui/data-table';
import { DuctSwatches } from '@/components/ui/duct-swatch';
import { DuctBundleForm, type PlannedDucts } from '@/components/forms/duct-bundle-form';
import { DuctJointForm } from '@/components/forms/duct-joint-form';
import { DuctRecordDelete, PlannedBundlesRefresh } from '@/components/forms/duct-record-actions';

export const metadata: Metadata = { title: 'Duct bundles' };

const ROUTE_COLUMNS: Column[] = [
  { key: 'route', label: 'Route' },
  { key: 'breaks', label: 'Continuity', priority: 1 },
  { key: 'planned', label: 'Planned bundle' },
  { key: 'installed', label: 'Installed (stretches, length)', align: 'right' },
  { key: 'connectors', label: 'Connectors', align: 'right' },
  { key: 'joints', label: 'Joints', align: 'right' },
  { key: 'worst', label: 'Most on one duct', align: 'right', priority: 3 },
];

const BUNDLE_COLUMNS: Column[] = [
  { key: 'stretch', label: 'Route and stretch' },
  { key: 'kind', label: 'Kind', priority: 1 },
  { key: 'ducts', label: 'Ducts' },
  { key: 'plan', label: 'Against the plan', priority: 1 },
  { key: 'colours', label: 'Colours in bundle order' },
  { key: 'extras', label: 'Tracer / tape / fill' },
  { key: 'note', label: 'Note', priority: 3 },
  { key: 'actions', label: '' },
];

const JOINT_COLUMNS: Column[] = [
  { key: 'where', label: 'Route and chainage' },
  { key: 'kind', label: 'Kind', priority: 1 },
  { key: 'ducts', label: 'Ducts joined' },
  { key: 'note', label: 'Note', priority: 3 },
  { key: 'actions', label: '' },
];

const yesNo = (v: boolean | null) => (v === null ? '—' : v ? 'yes' : 'no');

/** Bundles per route, planned against installed per stretch, continuity breaks and connectors, and the forms. */
export default async function DuctsPage({ params, searchParams }: { params: Promise<{ projectId: string }>; searchParams: Promise<{ edit?: string }> }) {
  const { projectId } = await params;
  const { edit } = await searchParams;
  const { me, project } = await requireProjectPage(projectId, 'record.read');
  const db = getDb();
  const [routes, bundles, joints, continuity, sizes, sequence] = await Promise.all([
    listAnchorRoutes(db, project.id),
    listDuctBundles(db, project.id),
    listDuctJoints(db, project.id),
    ductContinuity(db, project.id),
    listDuctSizes(db, project.id),
    project.records.colourSequenceId ? colourSequenceOfProject(db, project.id, project.records.colourSequenceId) : Promise.resolve(undefined),
  ]);
  const system = shownSystem(me.unitSystem, project.unitSystem);
  const len = (m: number) => formatQuantity(m, 'length', system);
  const canWrite = can(me.role, 'record.write') && me.organisationId === project.contractorOrgId;
  const base = `/projects/${project.id}`;
  const byRoute = new Map(continuity.map((c) => [c.routeId, c]));
  const against = new Map(continuity.flatMap((c) => c.stretches.map((s) => [s.bundleId, s] as const)));
  const breaks = continuity.flatMap((c) => c.breaks.map((b) => ({ ...b, routeRef: c.routeRef })));

  const routeRows: Row[] = routes
    .filter((r) => byRoute.has(r.id))
    .map((r) => {
      const c = byRoute.get(r.id)!;
      const planned = bundles.find((b) => b.routeId === r.id && b.kind === 'planned');
      const installed = bundles.filter((b) => b.routeId === r.id && b.kind === 'installed');
      const metres = installed.reduce((n, b) => n + b.toChainageM - b.fromChainageM, 0);
      return {
        id: r.id,
        cells: {
          route: { text: `${r.ref}${r.street ? ` · ${r.street}` : ''}${r.removed ? ' (route removed from plan)' : ''}`, sort: r.ref },
          breaks: c.breaks.length ? { text: `${c.breaks.length} break${c.breaks.length === 1 ? '' : 's'}`, tone: 'warn', sort: c.breaks.length } : installed.length > 1 ? { text: 'continuous', tone: 'ok', sort: 0 } : { text: '—', sort: 0 },
          planned: planned ? planned.summary : '—',
          installed: { text: installed.length ? `${installed.length} · ${len(metres)}` : '—', sort: metres },
          connectors: c.connectors.connectors,
          joints: c.connectors.joints,
          worst: c.connectors.worstDuct,
        },
      };
    });

  const bundleRows: Row[] = bundles.map((b) => {
    const a = against.get(b.id);
    return {
      id: b.id,
      cells: {
        stretch: {
          text: `${b.routeRef} ${len(b.fromChainageM)}–${len(b.toChainageM)}`,
          sort: `${b.routeRef} ${String(b.fromChainageM.toFixed(1)).padStart(10, '0')}`,
          node: (
            <span id={`bundle-${b.id}`} className="scroll-mt-24">
              {b.routeRef} {len(b.fromChainageM)}–{len(b.toChainageM)} {b.routeRemoved && <Badge tone="warn">route removed from plan</Badge>}
            </span>
          ),
        },
        kind: b.kind === 'planned' ? { text: `planned (${b.plannedSpec ?? ''})`, tone: 'muted' } : { text: 'installed', tone: 'info' },
        ducts: b.summary,
        plan: b.kind === 'planned' ? '—' : !a ? '—' : a.status === 'matches' ? { text: 'as planned', tone: 'ok' } : a.status === 'no_plan' ? { text: 'no plan here', tone: 'muted' } : { text: a.message, tone: 'warn' },
        colours: { text: b.ducts.map((d) => d.colourLabel ?? '—').join(', '), node: <DuctSwatches ducts={b.ducts} /> },
        extras: b.kind === 'planned' ? '—' : `${yesNo(b.tracerWire)} / ${yesNo(b.warningTape)} / ${yesNo(b.protectiveFill)}`,
        note: b.note || '—',
        actions:
          canWrite && b.kind === 'installed'
            ? {
                text: '',
                node: (
                  <span className="flex flex-wrap gap-2">
                    <Link href={`${base}/records/ducts?edit=${b.id}#bundle-form`} className="inline-flex min-h-10 items-center rounded-md border border-ink/15 px-3 text-sm">
                      Change
                    </Link>
                    <DuctRecordDelete url={`/api/projects/${project.id}/duct-bundles/${b.id}`} what={`the bundle on ${b.routeRef} ${len(b.fromChainageM)}–${len(b.toChainageM)}`} />
                  </span>
                ),
              }
            : '',
      },
    };
  });

  const jointRows: Row[] = joints.map((j) => ({
    id: j.id,
    cells: {
      where: { text: `${j.routeRef} at ${len(j.chainageM)}`, sort: `${j.routeRef} ${String(j.chainageM.toFixed(1)).padStart(10, '0')}` },
      kind: j.kind,
      ducts: j.ductPositions.join(', '),
      note: j.note || '—',
      actions: canWrite ? { text: '', node: <DuctRecordDelete url={`/api/projects/${project.id}/duct-joints/${j.id}`} what={`the ${j.kind} on ${j.routeRef} at ${len(j.chainageM)}`} /> } : '',
    },
  }));

  const current = routes.filter((r) => !r.removed);
  const planned: Record<string, PlannedDucts> = {};
  for (const b of bundles) if (b.kind === 'planned') planned[b.routeId] = { summary: b.summary, ducts: b.ducts.map((d) => ({ ductSizeId: d.ductSizeId, outerMm: d.outerMm, innerMm: d.innerMm, colourPosition: d.colourPosition })) };
  const colours = sequence ? allDuctColours(sequence) : [];
  const editBundle = edit ? bundles.find((b) => b.id === edit && b.kind === 'installed') : undefined;
  const editing = editBundle && {
    id: editBundle.id,
    label: `${editBundle.routeRef} ${len(editBundle.fromChainageM)}–${len(editBundle.toChainageM)}`,
    values: {
      routeId: editBundle.routeId,
      fromChainageM: editBundle.fromChainageM,
      toChainageM: editBundle.toChainageM,
      ducts: editBundle.ducts.map((d) => ({
        ductSizeId: d.ductSizeId ?? undefined,
        outerMm: d.ductSizeId ? undefined : d.outerMm,
        innerMm: d.ductSizeId ? undefined : (d.innerMm ?? undefined),
        colourPosition: d.colourPosition ?? 1,
        purpose: d.purpose ?? 'distribution',
      })),
      tracerWire: editBundle.tracerWire ?? false,
      warningTape: editBundle.warningTape ?? false,
      protectiveFill: editBundle.protectiveFill ?? false,
      note: editBundle.note,
    },
  };
  const editRoutes = editBundle?.routeRemoved ? [...current, routes.find((r) => r.id === editBundle.routeId)!] : current;

  return (
    <>
      <PageHeader
        title="Duct bundles"
        subtitle={
          <>
            What the design asks for and what was laid, per stretch; a duct keeps its colour and position unless a joint or connector is recorded. <Link href={`${base}/records`} className="underline">All records</Link> ·{' '}
            <Link href={`${base}/records/catalogues`} className="underline">Catalogues</Link>
          </>
        }
        actions={canWrite ? <PlannedBundlesRefresh projectId={project.id} /> : undefined}
      />
      <div className="flex flex-col gap-6">
        <Card title="Routes">
          <DataTable columns={ROUTE_COLUMNS} rows={routeRows} label="Duct bundles per route" empty="No bundle yet: derive the planned ones from the plan, or record what was laid." />
          <p className="mt-2 text-xs text-ink-soft">Every connector is a place where blowing the cable in slows down: fewer is better. “Most on one duct” is what the worst duct’s cable meets.</p>
        </Card>
        {breaks.length > 0 && (
          <Card title={`Continuity breaks (${breaks.length})`}>
            <ul className="flex flex-col gap-2">
              {breaks.map((b) => (
                <li key={`${b.beforeBundleId}-${b.afterBundleId}`}>
                  <Notice tone="warn">
                    <strong>{b.routeRef}</strong>: {b.message}{' '}
                    <a className="underline" href={`#bundle-${b.afterBundleId}`}>
                      The stretch after it
                    </a>
                  </Notice>
                </li>
              ))}
            </ul>
          </Card>
        )}
        <Card title="Bundles, planned and installed">
          <DataTable columns={BUNDLE_COLUMNS} rows={bundleRows} label="Duct bundles" empty="No bundles yet." />
        </Card>
        <Card title="Joints and connectors">
          <DataTable columns={JOINT_COLUMNS} rows={jointRows} label="Duct joints and connectors" empty="No joint or connector recorded." />
        </Card>
        {canWrite && current.length > 0 ? (
          <div className="grid gap-6 lg:grid-cols-2">
            <Card>
              <span id="bundle-form" className="scroll-mt-24" />
              {editing && (
                <p className="mb-3 text-sm">
                  <Link href={`${base}/records/ducts`} className="underline">
                    Record a new bundle instead
                  </Link>
                </p>
              )}
              {colours.length === 0 ? (
                <Notice tone="warn">The project has no colour sequence: an admin picks one in the project&apos;s settings before ducts can be recorded.</Notice>
              ) : (
                <DuctBundleForm
                  key={editing?.id ?? 'new'}
                  projectId={project.id}
                  system={system}
                  editing={editing}
                  routes={editRoutes.map((r) => ({ id: r.id, ref: r.ref, street: r.street, lengthM: r.lengthM }))}
                  sizes={sizes.filter((s) => !s.retired).map((s) => ({ id: s.id, label: `${s.outerMm}/${s.innerMm} mm${s.common ? ' (common)' : ''}` }))}
                  colours={colours}
                  planned={planned}
                />
              )}
            </Card>
            <Card>
              <DuctJointForm projectId={project.id} system={system} routes={current.map((r) => ({ id: r.id, ref: r.ref, street: r.street, lengthM: r.lengthM }))} positions={Math.max(12, ...bundles.map((b) => b.ducts.length))} />
            </Card>
          </div>
        ) : (
          !canWrite && (
            <p className="text-sm text-ink-soft">
              <Badge tone="muted">read only</Badge> The contractor&apos;s surveyors and engineers record duct bundles and joints.
            </p>
          )
        )}
      </div>
    </>
  );
}
