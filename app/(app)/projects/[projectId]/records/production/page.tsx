import type { Metadata } from 'next';
import Link from 'next/link';
import { getDb } from '@/db/client';
import { listProductionCorrections } from '@/db/production';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { COUNTED, dailyTotals, PRODUCTION_QUANTITIES, productionRangeSchema, QUANTITY_LABELS, type ProductionFigure, type ProductionQuantity } from '@/lib/records/production';
import { formatQuantity, shownSystem, toShown, unitOf, type UnitSystem } from '@/lib/records/units';
import { formatInZone } from '@/lib/records/zoned-time';
import { projectProduction } from '@/lib/services/production';
import { Badge, Card, PageHeader } from '@/components/ui/primitives';
import { DataTable, type Cell, type Column, type Row } from '@/components/ui/data-table';
import { ProductionChart } from '@/components/charts/production-chart';
import { ProductionCorrectionForm } from '@/components/forms/production-correction-form';
import { RemoveRecordButton } from '@/components/forms/remove-record';

export const metadata: Metadata = { title: 'Daily production' };

const amount = (v: number | null, q: ProductionQuantity, system: UnitSystem) => (v === null ? '—' : COUNTED.has(q) ? String(v) : formatQuantity(v, 'length', system));

/** A figure: the shown one, and when corrected, the derived one and the reason beside it. */
function figureCell(f: ProductionFigure, q: ProductionQuantity, system: UnitSystem): Cell {
  if (!f.correction) return { text: amount(f.shown, q, system), sort: f.shown ?? -1 };
  return {
    text: `${amount(f.shown, q, system)} (corrected; derived ${amount(f.derived, q, system)}: ${f.correction.reason})`,
    tone: 'info',
    sort: f.shown ?? -1,
  };
}

/** Daily production per crew and day, derived from the records and corrected by hand with a reason. */
export default async function ProductionPage({ params, searchParams }: { params: Promise<{ projectId: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { projectId } = await params;
  const { me, project } = await requireProjectPage(projectId, 'record.read');
  const sp = await searchParams;
  const parsed = productionRangeSchema.safeParse({ from: typeof sp.from === 'string' && sp.from ? sp.from : undefined, to: typeof sp.to === 'string' && sp.to ? sp.to : undefined });
  const range = parsed.success ? parsed.data : {};
  const db = getDb();
  const [days, corrections] = await Promise.all([projectProduction(db, project, range), listProductionCorrections(db, project.id)]);
  const system = shownSystem(me.unitSystem, project.unitSystem);
  const canWrite = can(me.role, 'record.write') && me.organisationId === project.contractorOrgId;
  const base = `/projects/${project.id}`;

  const columns: Column[] = [
    { key: 'day', label: 'Day' },
    { key: 'crew', label: 'Crew', priority: 1 },
    ...PRODUCTION_QUANTITIES.map((q) => ({ key: q, label: COUNTED.has(q) ? QUANTITY_LABELS[q] : QUANTITY_LABELS[q].replace('(m)', `(${unitOf('length', system)})`), align: 'right' as const })),
  ];
  const rows: Row[] = days.map((d) => ({
    id: `${d.day}|${d.crew}`,
    cells: {
      day: d.day,
      crew: d.crew || 'no crew named',
      ...Object.fromEntries(PRODUCTION_QUANTITIES.map((q) => [q, figureCell(d.figures[q], q, system)])),
    },
  }));
  const totals = dailyTotals(days);
  const shown = (m: number) => Number(toShown(m, 'length', system).toFixed(1));
  const chart = totals.map((t) => ({ day: t.day, sawn: shown(t.sawn_m), laid: shown(t.laid_m), backfilled: shown(t.backfilled_m), restored: shown(t.restored_m) }));
  const sum = (q: ProductionQuantity) => totals.reduce((s, t) => s + t[q], 0);
  const summary = `${totals.length} days: ${formatQuantity(sum('sawn_m'), 'length', system)} sawn, ${formatQuantity(sum('laid_m'), 'length', system)} laid, ${formatQuantity(sum('backfilled_m'), 'length', system)} backfilled, ${formatQuantity(sum('restored_m'), 'length', system)} restored; ${sum('crossings')} crossings made, ${sum('pits')} pits dug.`;
  const crews = [...new Set(days.map((d) => d.crew))].sort();

  const correctionColumns: Column[] = [
    { key: 'day', label: 'Day' },
    { key: 'crew', label: 'Crew' },
    { key: 'quantity', label: 'What' },
    { key: 'value', label: 'Figure', align: 'right' },
    { key: 'reason', label: 'Reason' },
    { key: 'by', label: 'By', priority: 3 },
    ...(canWrite ? [{ key: 'actions', label: '', priority: 3 as const }] : []),
  ];
  const correctionRows: Row[] = [...corrections].reverse().map((c) => ({
    id: c.id,
    cells: {
      day: c.day,
      crew: c.crew || 'no crew named',
      quantity: QUANTITY_LABELS[c.quantity],
      value: amount(c.value, c.quantity, system),
      reason: c.reason,
      by: `${c.createdByName ?? '—'}, ${formatInZone(c.createdAt, project.timeZone).slice(0, 16)}`,
      ...(canWrite ? { actions: { text: '', node: <RemoveRecordButton url={`/api/projects/${project.id}/production/corrections/${c.id}`} label={`Withdraw the correction of ${c.day}`} confirmText="Withdraw this correction? The figure falls back to the one before it, or the derived one." /> } } : {}),
    },
  }));

  return (
    <>
      <PageHeader
        title="Daily production"
        subtitle={<>Per crew and day on the project&apos;s clock ({project.timeZone}), derived from the records; a figure corrected by hand shows the derived one and the reason beside it. <Link href={`${base}/records`} className="underline">All records</Link></>}
      />
      <div className="flex flex-col gap-6">
        <form method="get" className="flex flex-wrap items-end gap-3 text-sm" aria-label="Days shown">
          <label className="flex flex-col">From <input type="date" name="from" defaultValue={range.from ?? ''} className="min-h-10 rounded-md border border-ink/20 px-2" /></label>
          <label className="flex flex-col">To <input type="date" name="to" defaultValue={range.to ?? ''} className="min-h-10 rounded-md border border-ink/20 px-2" /></label>
          <button type="submit" className="min-h-10 rounded-md border border-ink/20 px-3">Show</button>
          {!parsed.success && <span role="alert" className="text-status-bad">{parsed.error.issues[0].message} All days are shown.</span>}
        </form>
        {chart.length > 0 && <ProductionChart data={chart} unit={unitOf('length', system)} summary={summary} />}
        <DataTable columns={columns} rows={rows} label="Daily production per crew" empty="Nothing recorded on these days." />
        <p className="text-xs text-ink-soft">
          Laid: built sections by their lay date, the crew named on their uploads. Sawn: the laid metres (the slot is sawn the day its ducts go in) and the built road crossings&apos; measured lengths. Backfilled and restored: the restorations&apos; stretches. Crossings: by the date built. Pits: by the date dug.
        </p>
        {(corrections.length > 0 || canWrite) && (
          <Card title="Corrections">
            <div className="flex flex-col gap-6">
              <DataTable columns={correctionColumns} rows={correctionRows} label="Production corrections" empty="No figure corrected by hand." />
              {canWrite ? <ProductionCorrectionForm projectId={project.id} crews={crews} system={system} /> : <p className="text-sm text-ink-soft"><Badge tone="muted">read only</Badge> The contractor&apos;s people correct figures.</p>}
            </div>
          </Card>
        )}
      </div>
    </>
  );
}
