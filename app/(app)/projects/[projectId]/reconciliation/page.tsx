import type { Metadata } from 'next';
import { getDb } from '@/db/client';
import { listCurrentSections } from '@/db/sections';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { formatLength } from '@/lib/records/units';
import { plannedFeatureCollection } from '@/lib/services/planned';
import { reviewProgress, sectionFeature, sectionTotals } from '@/lib/services/reconcile';
import { projectFindings } from '@/lib/services/quality-checks';
import { findingsOnStretch } from '@/lib/records/quality-checks';
import { Card, Notice, PageHeader } from '@/components/ui/primitives';
import { GeoMap, type MapLayer } from '@/components/map/geo-map';
import { JobButton } from '@/components/forms/job-button';
import { SectionsReviewTable, type SectionRowMeta } from '@/components/forms/sections-review-table';
import { PLANNED_COLOUR, REVIEW_STYLE, STATUS_STYLE } from '@/components/ui/section-status';

export const metadata: Metadata = { title: 'Planned against built' };

export default async function ReconciliationPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { me, project } = await requireProjectPage(projectId, 'section.read');
  const db = getDb();
  const [sections, planned, findings] = await Promise.all([listCurrentSections(db, project.id), plannedFeatureCollection(db, project.id, false), projectFindings(db, project)]);
  const openChecks = (s: (typeof sections)[number]) => findingsOnStretch(findings, s.plannedRouteRef, s.fromChainageM, s.toChainageM).length;
  const totals = sectionTotals(sections);
  const features = sections.map(sectionFeature);
  const layers: MapLayer[] = [
    { id: 'planned', data: planned, colour: PLANNED_COLOUR, dashed: true, width: 2 },
    ...(Object.keys(STATUS_STYLE) as (keyof typeof STATUS_STYLE)[]).map((st) => ({
      id: st,
      data: { type: 'FeatureCollection' as const, features: features.filter((f) => f.properties.status === st) },
      colour: STATUS_STYLE[st].colour,
      width: st === 'not_built' ? 2 : 4,
      dashed: st === 'not_built',
    })),
  ];
  const unit = project.unitSystem;
  const reviewer = can(me.role, 'section.review');
  const progress = reviewProgress(sections);
  // a figure nothing measured (not built; an unplanned line's offset) is a dash, never 0.00 m
  const figure = (x: number | null) => (x === null ? { text: '—', sort: -1 } : { text: formatLength(x, unit), sort: x });
  const label = (s: (typeof sections)[number]) => `${s.plannedRouteRef ?? 'unplanned'} ${s.fromChainageM.toFixed(0)}–${s.toChainageM.toFixed(0)} m (${STATUS_STYLE[s.status].label})`;
  const meta: Record<string, SectionRowMeta> = Object.fromEntries(sections.map((s) => [s.id, { status: s.status, review: s.review, label: label(s) }]));
  return (
    <>
      <PageHeader
        title="Planned against built"
        subtitle={`${formatLength(totals.builtM, unit)} built of ${formatLength(totals.plannedM, unit)} planned (${(totals.coverage * 100).toFixed(1)} %); ${formatLength(totals.laidM, unit)} laid including unplanned stretches.`}
        actions={can(me.role, 'reconcile.run') ? <JobButton startUrl={`/api/projects/${project.id}/reconcile`} label="Reconcile now" resultLabel="" refreshOnDone /> : undefined}
      />
      <div className="space-y-6">
        <GeoMap label="Map of planned routes and built sections" layers={layers} height={480} />
        <ul className="flex flex-wrap gap-4 text-xs" aria-label="Legend">
          <li className="flex items-center gap-1"><span aria-hidden="true" data-swatch={PLANNED_COLOUR} className="inline-block w-6" style={{ borderTop: `2px dashed ${PLANNED_COLOUR}` }} /> planned route</li>
          {Object.entries(STATUS_STYLE).map(([k, s]) => (
            <li key={s.label} className="flex items-center gap-1">
              <span aria-hidden="true" data-swatch={s.colour} className="inline-block w-6" style={k === 'not_built' ? { borderTop: `2px dashed ${s.colour}` } : { height: 4, background: s.colour }} /> {s.label}
            </li>
          ))}
        </ul>
        <Card
          title="Sections"
          actions={
            <span className="flex gap-3 text-sm">
              <a href={`/api/projects/${project.id}/sections?format=csv`} title="A zip: the CSV table and a README with the caution and the coordinate system">Download CSV (zip)</a>
              <a href={`/api/projects/${project.id}/sections?format=xlsx`}>Download Excel</a>
              <a href={`/api/projects/${project.id}/sections?format=geojson`}>Download GeoJSON</a>
            </span>
          }
        >
          <div className="mb-4">
            {progress.fullyApproved ? (
              <Notice tone="ok">Fully approved: all {progress.total} sections are settled ({progress.approved} approved{progress.acknowledged ? `, ${progress.acknowledged} acknowledged as not built` : ''}).</Notice>
            ) : progress.total > 0 ? (
              <p className="text-sm text-ink-soft" aria-label="Review progress">
                Review: {progress.settled} of {progress.total} sections settled ({progress.approved} approved, {progress.acknowledged} acknowledged as not built); {progress.pending} pending, {progress.rejected} rejected. A not-built stretch is settled by acknowledging it with the reason.
              </p>
            ) : null}
          </div>
          <SectionsReviewTable
            projectId={project.id}
            reviewer={reviewer}
            meta={meta}
            columns={[
              { key: 'route', label: 'Route' },
              { key: 'street', label: 'Street' },
              { key: 'chainage', label: 'Chainage', align: 'right' },
              { key: 'length', label: 'Length', align: 'right' },
              { key: 'status', label: 'Status' },
              // review beside status: on a narrow screen the columns that scroll away are the figures
              { key: 'review', label: 'Review' },
              { key: 'checks', label: 'Open checks', align: 'right' },
              { key: 'max', label: 'Max offset', align: 'right' },
              { key: 'p95', label: 'P95 offset', align: 'right' },
              { key: 'acc', label: 'Accuracy (95 %)', align: 'right' },
              { key: 'sources', label: 'Sources', align: 'right' },
              { key: 'laid', label: 'Laid on' },
            ]}
            rows={sections.map((s) => {
              const street = planned.features.find((f) => f.properties.ref === s.plannedRouteRef)?.properties.street ?? '';
              return {
                id: s.id,
                cells: {
                  route: { text: s.plannedRouteRef ?? 'unplanned', href: `/projects/${project.id}/sections/${s.id}` },
                  street,
                  // an unplanned line has no chainage on a route: metres along itself
                  chainage: { text: `${formatLength(s.fromChainageM, unit)} – ${formatLength(s.toChainageM, unit)}`, sort: s.fromChainageM },
                  length: { text: formatLength(s.lengthM, unit), sort: s.lengthM },
                  status: { text: STATUS_STYLE[s.status].label, swatch: STATUS_STYLE[s.status].colour },
                  max: figure(s.maxOffsetM),
                  p95: figure(s.p95OffsetM),
                  acc: figure(s.accuracyM),
                  sources: s.sourceUploadIds.length,
                  laid: s.laidOn ?? '—',
                  review: { text: REVIEW_STYLE[s.review].label, tone: REVIEW_STYLE[s.review].tone },
                  checks: (() => {
                    const n = openChecks(s);
                    return n === 0 ? { text: 'none', tone: 'ok' as const, sort: 0 } : { text: `${n} open`, tone: 'warn' as const, sort: n, href: `/projects/${project.id}/sections/${s.id}` };
                  })(),
                },
              };
            })}
          />
        </Card>
      </div>
    </>
  );
}
