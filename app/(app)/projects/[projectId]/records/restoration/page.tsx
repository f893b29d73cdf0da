import type { Metadata } from 'next';
import Link from 'next/link';
import { getDb } from '@/db/client';
import { listBackfillMaterials } from '@/db/catalogues';
import { listAnchorRoutes } from '@/db/record-anchors';
import { listRestorations } from '@/db/restorations';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { formatQuantity, shownSystem } from '@/lib/records/units';
import { formatInZone } from '@/lib/records/zoned-time';
import { Badge, Card, PageHeader } from '@/components/ui/primitives';
import { Cautions } from '@/components/ui/cautions';
import { DataTable, type Column, type Row } from '@/components/ui/data-table';
import { RestorationForm, type RestorationDraft } from '@/components/forms/restoration-form';
import { RemoveRecordButton } from '@/components/forms/remove-record';

export const metadata: Metadata = { title: 'Surface restoration' };

const VERDICT_TONE = { pass: 'ok', warn: 'warn', fail: 'bad' } as const;

/** The restorations of the project with their verdicts (pass, warn, fail and why), and the form to record one. */
export default async function RestorationPage({ params, searchParams }: { params: Promise<{ projectId: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { projectId } = await params;
  const { edit } = await searchParams;
  const { me, project } = await requireProjectPage(projectId, 'record.read');
  const db = getDb();
  const [restorations, materials, routes] = await Promise.all([listRestorations(db, project.id), listBackfillMaterials(db, project.id), listAnchorRoutes(db, project.id)]);
  const system = shownSystem(me.unitSystem, project.unitSystem);
  const canWrite = can(me.role, 'record.write') && me.organisationId === project.contractorOrgId;
  const base = `/projects/${project.id}`;
  const rs = project.records;
  const time = (t: string | null) => (t ? formatInZone(t, project.timeZone).slice(0, 16) : '—');
  const temp = (c: number) => formatQuantity(c, 'temperature', system);

  const columns: Column[] = [
    { key: 'stretch', label: 'Stretch' },
    { key: 'verdict', label: 'Check', priority: 1 },
    { key: 'why', label: 'Why' },
    { key: 'restoredAt', label: 'Restored' },
    { key: 'delay', label: 'Cleaned → laid', align: 'right' },
    { key: 'temps', label: 'Laying temperatures' },
    { key: 'thickness', label: 'Laid / required', align: 'right' },
    { key: 'passes', label: 'Passes', align: 'right', priority: 3 },
    { key: 'backfill', label: 'Backfill', priority: 3 },
    { key: 'crew', label: 'Crew', priority: 3 },
    ...(canWrite ? [{ key: 'actions', label: '', priority: 3 as const }] : []),
  ];
  const rows: Row[] = restorations.map((r) => ({
    id: r.id,
    cells: {
      stretch: { text: `${r.routeRef} ${formatQuantity(r.fromChainageM, 'length', system)} – ${formatQuantity(r.toChainageM, 'length', system)}${r.routeRemoved ? ' (route removed from plan)' : ''}`, sort: `${r.routeRef} ${String(r.fromChainageM).padStart(9, '0')}` },
      verdict: { text: r.check.verdict, tone: VERDICT_TONE[r.check.verdict] },
      why: r.check.reasons.map((x) => x.text).join(' ') || 'Within every limit.',
      restoredAt: { text: time(r.restoredAt), sort: r.restoredAt },
      delay: r.check.delayMin === null ? '—' : { text: `${Math.round(r.check.delayMin)} min`, tone: r.check.late ? 'warn' : undefined, sort: r.check.delayMin },
      temps: r.temperatures.length ? r.temperatures.map((t) => temp(t.tempC)).join(', ') : '—',
      thickness: { text: `${formatQuantity(r.laidThicknessMm, 'small', system)} / ${formatQuantity(r.requiredThicknessMm, 'small', system)}`, sort: r.laidThicknessMm ?? -1 },
      passes: r.compactionPasses,
      backfill: r.backfillMaterial ?? '—',
      crew: r.crew || '—',
      ...(canWrite
        ? {
            actions: {
              text: '',
              node: (
                <span className="flex gap-2">
                  <Link href={`?edit=${r.id}#change`} className="inline-flex min-h-10 items-center rounded-md border border-ink/20 px-3 text-sm">Change</Link>
                  <RemoveRecordButton url={`/api/projects/${project.id}/restorations/${r.id}`} label={`Remove the restoration of ${r.routeRef} ${r.fromChainageM}–${r.toChainageM} m`} confirmText="Remove this restoration and its temperature readings?" />
                </span>
              ),
            },
          }
        : {}),
    },
  }));
  const wall = (t: string | null) => (t ? formatInZone(t, project.timeZone, 'T').slice(0, 16) : '');
  const editing = canWrite && typeof edit === 'string' ? restorations.find((r) => r.id === edit) : undefined;
  const draft: RestorationDraft | undefined = editing && {
    id: editing.id, label: `${editing.routeRef} ${editing.fromChainageM}–${editing.toChainageM} m`, routeId: editing.routeId, fromChainageM: editing.fromChainageM, toChainageM: editing.toChainageM,
    restoredAt: wall(editing.restoredAt), backfillMaterialId: editing.backfillMaterialId, compactionPasses: editing.compactionPasses, requiredThicknessMm: editing.requiredThicknessMm,
    laidThicknessMm: editing.laidThicknessMm, edgesCleanedAt: wall(editing.edgesCleanedAt), surfaceLaidAt: wall(editing.surfaceLaidAt), crew: editing.crew, note: editing.note,
    temperatures: editing.temperatures.map((t) => ({ tempC: t.tempC, measuredAt: wall(t.measuredAt) })),
  };
  const counts = { pass: 0, warn: 0, fail: 0 };
  for (const r of restorations) counts[r.check.verdict] += 1;

  return (
    <>
      <PageHeader
        title="Surface restoration"
        subtitle={<>Edges cleaned, backfill compacted, hot bituminous surface laid, per stretch. {counts.pass} pass, {counts.warn} warn, {counts.fail} fail. <Link href={`${base}/records`} className="underline">All records</Link></>}
      />
      <div className="flex flex-col gap-6">
        <Cautions kinds={['hotBitumen']} />
        <p className="text-sm text-ink-soft">
          Checked against this project&apos;s settings: laying temperature {temp(rs.layingTempTargetC)} ± {formatQuantity(rs.layingTempToleranceC, 'temperatureDifference', system)} (a reading outside fails;
          no reading warns), laid thickness at least the required one (else fail), at least {rs.compactionPassesDefault} compaction passes (else warn), surface laid within {rs.restorationMaxDelayMin} min of cleaning the edges (else late, a warning). Times on the project&apos;s clock ({project.timeZone}).
        </p>
        <div id="restorations">
          <DataTable columns={columns} rows={rows} label="Surface restorations" empty="No restoration recorded yet." />
        </div>
        {restorations.length > 0 && (
          <ul className="sr-only">
            {restorations.map((r) => <li key={r.id} id={`restoration-${r.id}`}>{r.routeRef} {r.fromChainageM}–{r.toChainageM} m: {r.check.verdict}</li>)}
          </ul>
        )}
        {draft && (
          <div id="change">
            <Card title="Change a restoration" actions={<Link href="?" className="text-sm underline">Close</Link>}>
              <RestorationForm
                key={draft.id}
                record={draft}
                projectId={project.id}
                system={system}
                timeZone={project.timeZone}
                routes={[]}
                materials={materials.filter((m) => !m.retired || m.id === draft.backfillMaterialId).map((m) => ({ id: m.id, label: m.label }))}
                defaults={{ compactionPasses: rs.compactionPassesDefault, requiredThicknessMm: rs.surfaceThicknessMm }}
              />
            </Card>
          </div>
        )}
        {canWrite ? (
          <Card title="Record a restoration">
            <RestorationForm
              projectId={project.id}
              system={system}
              timeZone={project.timeZone}
              routes={routes.filter((r) => !r.removed).map((r) => ({ id: r.id, ref: r.ref, street: r.street, lengthM: r.lengthM }))}
              materials={materials.filter((m) => !m.retired).map((m) => ({ id: m.id, label: m.label }))}
              defaults={{ compactionPasses: rs.compactionPassesDefault, requiredThicknessMm: rs.surfaceThicknessMm }}
            />
          </Card>
        ) : (
          <p className="text-sm text-ink-soft"><Badge tone="muted">read only</Badge> The contractor&apos;s surveyors and engineers record restorations.</p>
        )}
      </div>
    </>
  );
}
