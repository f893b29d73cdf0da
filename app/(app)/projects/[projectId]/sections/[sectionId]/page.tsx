import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { getDb } from '@/db/client';
import { listPlannedRoutes } from '@/db/planned';
import { getSection, listCurrentSections } from '@/db/sections';
import { listUploads } from '@/db/uploads';
import { isUuid } from '@/lib/api/with-route';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { offsetProfile } from '@/lib/matching/offset-profile';
import { ACCURACY_CLASSES, ACCURACY_CLASS_LABELS } from '@/lib/records/accuracy-classes';
import { formatLength } from '@/lib/records/units';
import { sectionDetail } from '@/lib/services/reconcile';
import { OffsetPlot } from '@/components/charts/offset-plot';
import { SectionCorrections, WithdrawCorrection } from '@/components/forms/section-corrections';
import { SectionReview } from '@/components/forms/section-review';
import { GeoMap, type MapLayer } from '@/components/map/geo-map';
import { DataTable } from '@/components/ui/data-table';
import { Badge, Card, Notice, PageHeader } from '@/components/ui/primitives';
import { PLANNED_COLOUR, REVIEW_STYLE, STATUS_STYLE } from '@/components/ui/section-status';
import { R95_FACTOR } from '@/lib/records/accuracy-classes';
import { formatInZone } from '@/lib/records/zoned-time';
import { shownSystem } from '@/lib/records/units';
import { SectionChecks, SectionRecordsCard } from '@/components/records/section-records';

export const metadata: Metadata = { title: 'Section' };

/** Every k-th point, so a long walk's thousands of fixes stay a light plot. */
const thin = <T,>(xs: T[], max: number) => (xs.length <= max ? xs : xs.filter((_, i) => i % Math.ceil(xs.length / max) === 0));

const KIND_TEXT = { split: 'split', merge: 'merge', reassign: 'move to another route', mark_built: 'counted built on another source', promote: 'promoted to a planned route', not_built_reason: 'reason for not built' } as const;

export default async function SectionPage({ params }: { params: Promise<{ projectId: string; sectionId: string }> }) {
  const { projectId, sectionId } = await params;
  const { me, project } = await requireProjectPage(projectId, 'section.read');
  const db = getDb();
  const found = isUuid(sectionId) ? await getSection(db, sectionId) : undefined;
  if (!found || found.projectId !== project.id) notFound();
  const d = await sectionDetail(db, found.id);
  const s = d.section;
  const unit = project.unitSystem;
  const style = STATUS_STYLE[s.status];
  const current = s.retiredInRun === null;
  const successors = current ? [] : (await listCurrentSections(db, project.id)).filter((x) => x.derivedFrom === s.id || (x.plannedRouteRef === s.plannedRouteRef && s.plannedRouteRef !== null && x.fromChainageM < s.toChainageM && x.toChainageM > s.fromChainageM));
  const title = s.plannedRouteRef ? `${s.plannedRouteRef}, ${s.fromChainageM.toFixed(1)}–${s.toChainageM.toFixed(1)} m` : `Unplanned stretch, ${formatLength(s.lengthM, unit)}`;
  const layers: MapLayer[] = [
    ...(d.route ? [{ id: 'route', colour: PLANNED_COLOUR, dashed: true, width: 2, data: { type: 'FeatureCollection' as const, features: [{ type: 'Feature' as const, properties: { ref: d.route.ref }, geometry: d.route.geometry }] } }] : []),
    { id: 'section', colour: style.colour, width: 5, dashed: s.status === 'not_built', data: { type: 'FeatureCollection', features: [{ type: 'Feature', properties: { id: s.id }, geometry: s.geometry }] } },
  ];
  const names = new Map(d.sources.map((u) => [u.id, u.fileName]));
  const series = d.observations.map((o) => ({
    label: names.get(o.uploadId) ?? o.uploadId.slice(0, 8),
    points: thin(o.chainageM.map((c, i) => ({ chainageM: c, offsetM: o.offsetM[i], time: o.timeS[i] === null ? null : formatInZone(o.timeS[i]! * 1000, project.timeZone) })), 1500),
  }));
  const observed = d.observations.reduce((n, o) => n + o.chainageM.length, 0);
  const asBuilt = d.route && s.status !== 'not_built' ? offsetProfile(d.route.geometry.coordinates, s.geometry.coordinates) : [];
  // a figure nothing measured (not built; an unplanned line's offset from a plan) is a dash, never 0.00 m
  const fig = (x: number | null) => (x === null ? '—' : formatLength(x, unit));
  // when each source walked this stretch, on the project's clock: to pick a range to leave out
  const walked = new Map(d.observations.map((o) => {
    const ts = o.timeS.filter((t, i): t is number => t !== null && o.chainageM[i] >= s.fromChainageM && o.chainageM[i] <= s.toChainageM);
    return [o.uploadId, ts.length ? { first: Math.min(...ts), last: Math.max(...ts) } : null] as const;
  }));
  const counted = d.sources.filter((u) => u.wonHere);
  // offsets beyond the tolerance that the section test did not flag: the source's noise swamps them
  const noisy = s.status === 'as_planned' && s.maxOffsetM !== null && s.maxOffsetM > d.toleranceM && counted.length > 0;
  const facts: [string, React.ReactNode][] = [
    ['Street', d.route?.street ?? '—'],
    ['Planned duct bundle', d.route?.ducts ?? '—'],
    ['Kind', d.route ? (d.route.kind === 'crossing' ? 'road crossing' : 'street route') : 'not on the plan'],
    ['Chainage', s.plannedRouteRef ? `${formatLength(s.fromChainageM, unit)} to ${formatLength(s.toChainageM, unit)}` : '—'],
    s.status === 'not_built' ? ['Planned length', formatLength(s.lengthM, unit)] : ['Laid length (from the as-built line)', formatLength(s.lengthM, unit)],
    ['Max / 95th-percentile offset', s.maxOffsetM === null ? '—' : `${fig(s.maxOffsetM)} / ${fig(s.p95OffsetM)}`],
    ['Position accuracy (95 % radius)', fig(s.accuracyM)],
    ['Laid on', s.laidOn ?? '—'],
    ['Lateral tolerance of the project', formatLength(d.toleranceM, unit)],
    ['Runs', `first found in run ${s.firstRun}, last in run ${s.lastRun}${s.retiredInRun ? `, retired in run ${s.retiredInRun}` : ''}`],
    ...(s.derivedFrom ? [['Came from', <Link key="from" href={`/projects/${project.id}/sections/${s.derivedFrom}`}>an earlier section</Link>] as [string, React.ReactNode]] : []),
    ...(s.note ? [['Note', s.note] as [string, React.ReactNode]] : []),
  ];
  const engineer = can(me.role, 'section.correct');
  const uploads = engineer && s.status === 'not_built' ? (await listUploads(db, project.id)).filter((u) => u.status === 'stored') : [];
  const routes = engineer && s.plannedRouteRef ? (await listPlannedRoutes(db, project.id)).filter((r) => r.ref !== s.plannedRouteRef) : [];
  const neighbours = [d.neighbours.before && { ...d.neighbours.before, side: 'before' }, d.neighbours.after && { ...d.neighbours.after, side: 'after' }]
    .filter((n): n is NonNullable<typeof n> => !!n && n.status !== 'not_built')
    .map((n) => ({ id: n.id, label: `${n.side === 'before' ? 'the one before' : 'the one after'}: ${n.fromChainageM.toFixed(1)}–${n.toChainageM.toFixed(1)} m, ${STATUS_STYLE[n.status as keyof typeof STATUS_STYLE].label}` }));
  return (
    <>
      <p className="mb-2 text-sm"><Link href={`/projects/${project.id}/reconciliation`}>← Planned against built</Link></p>
      <PageHeader
        title={title}
        subtitle={
          <span className="flex flex-wrap items-center gap-2">
            <Badge swatch={style.colour}>{style.label}</Badge>
            <Badge tone={REVIEW_STYLE[s.review].tone}>review: {REVIEW_STYLE[s.review].label}</Badge>
            {s.reviewComment && <span>“{s.reviewComment}”</span>}
          </span>
        }
      />
      {!current && (
        <div className="mb-4">
          <Notice tone="warn">
            A later reconciliation (run {s.retiredInRun}) no longer finds this stretch as it was; the record keeps it.{' '}
            {successors.length > 0 && <>Now: {successors.map((x, i) => <span key={x.id}>{i > 0 && ', '}<Link href={`/projects/${project.id}/sections/${x.id}`}>{x.plannedRouteRef ?? 'unplanned'} {x.fromChainageM.toFixed(1)}–{x.toChainageM.toFixed(1)} m</Link></span>)}.</>}
          </Notice>
        </div>
      )}
      {noisy && (
        <div className="mb-4">
          <Notice tone="info">
            <span className="font-medium">Why this stretch is not flagged as deviating.</span> Offsets of up to {fig(s.maxOffsetM)} reach beyond the project&apos;s
            tolerance of ±{formatLength(d.toleranceM, unit)}, but {counted.map((u) => `${u.fileName} (typical error ${formatLength(u.sigmaM, unit)} each way, 95 % radius ${formatLength(u.sigmaM * R95_FACTOR, unit)})`).join(' and ')}{' '}
            {counted.length === 1 ? 'places each fix' : 'place each fix'} only that closely: an offset this size can be the source&apos;s own noise. A stretch is
            flagged only where its smoothed offset exceeds the tolerance by more than its own 95 % uncertainty (here the line is known to ±{fig(s.accuracyM)}), over
            several metres. To settle it, survey the stretch with RTK GNSS or a total station, or check it on site.
          </Notice>
        </div>
      )}
      <div className="grid gap-6 lg:grid-cols-5">
        <div className="lg:col-span-3">
          <GeoMap label="Map of the section and its planned route" layers={layers} height={360} />
        </div>
        <div className="lg:col-span-2">
        <Card title="The record">
          <dl className="grid grid-cols-2 gap-x-4 gap-y-3 text-sm">
            {facts.map(([k, v]) => (
              <div key={k}>
                <dt className="text-ink-soft">{k}</dt>
                <dd className="font-medium">{v}</dd>
              </div>
            ))}
          </dl>
        </Card>
        </div>
      </div>
      <div className="mt-6 space-y-6">
        {d.route && (
          <Card title="Offset from the plan">
            {observed === 0 ? (
              <p className="text-sm text-ink-soft">No observation of the latest run lies on this stretch{s.status === 'not_built' ? ': it is not built, or not yet surveyed.' : '.'}</p>
            ) : (
              <OffsetPlot
                series={series}
                asBuilt={asBuilt}
                toleranceM={d.toleranceM}
                fromM={Math.max(0, s.fromChainageM - 10)}
                toM={s.toChainageM + 10}
                section={[s.fromChainageM, s.toChainageM]}
                summary={`${observed} matched observations from ${d.observations.length} upload${d.observations.length === 1 ? '' : 's'} within 10 m of the section; as-built line in black.`}
              />
            )}
          </Card>
        )}
        <Card title="Source uploads">
          <DataTable
            label="Source uploads"
            empty="No upload observed this stretch."
            columns={[
              { key: 'file', label: 'File' },
              { key: 'accuracy', label: 'Accuracy class' },
              { key: 'sigma', label: 'Typical error each way', align: 'right' },
              { key: 'date', label: 'Survey date' },
              { key: 'crew', label: 'Crew' },
              { key: 'walked', label: `Fixes on this stretch (${project.timeZone})` },
              { key: 'role', label: 'Here' },
            ]}
            rows={d.sources.map((u) => ({
              id: u.id,
              cells: {
                file: { text: u.fileName, href: `/projects/${project.id}/uploads/${u.id}` },
                accuracy: ACCURACY_CLASS_LABELS[u.accuracyClass],
                sigma: { text: formatLength(u.sigmaM, unit), sort: u.sigmaM },
                date: u.surveyDate ?? '—',
                crew: u.crew || '—',
                walked: (() => {
                  const w = walked.get(u.id);
                  if (!w) return '—';
                  const text = `${formatInZone(w.first * 1000, project.timeZone)} – ${formatInZone(w.last * 1000, project.timeZone).slice(11)}`;
                  // an engineer can take the stretch's times straight to the upload's "left out of matching" form
                  return engineer ? { text, href: `/projects/${project.id}/uploads/${u.id}?from=${w.first}&to=${w.last}#left-out` } : text;
                })(),
                role: { text: u.wonHere ? 'counted' : 'seen nearby', tone: u.wonHere ? 'ok' : 'muted' },
              },
            }))}
          />
        </Card>
        {s.plannedRouteRef !== null && (
          <SectionRecordsCard
            records={d.records}
            projectId={project.id}
            system={shownSystem(me.unitSystem, project.unitSystem)}
            minCoverM={project.minCoverDepthM}
            timeZone={project.timeZone}
            fromM={s.fromChainageM}
            toM={s.toChainageM}
          />
        )}
        {current && <SectionChecks findings={d.openChecks} />}
        {can(me.role, 'section.review') && current && (
          <Card title="Review">
            {s.status === 'not_built' && (
              <p className="mb-3 text-sm text-ink-soft">Nothing was laid here to approve. Acknowledge the stretch as not built, with the reason, to settle it; or reject it if it must still be built.</p>
            )}
            <SectionReview sections={[{ id: s.id, label: title, review: s.review }]} notBuilt={s.status === 'not_built'} openChecks={d.openChecks.length} />
          </Card>
        )}
        <Card title="Corrections">
          {engineer && current && (
            <div className="mb-5">
              <SectionCorrections
                target={{
                  id: s.id, status: s.status, fromM: s.fromChainageM, toM: s.toChainageM, neighbours,
                  routes: routes.map((r) => ({ ref: r.ref, label: `${r.ref}${r.street ? ` (${r.street})` : ''}` })),
                  uploads: uploads.map((u) => ({ id: u.id, label: `${u.fileName}${u.surveyDate ? `, ${u.surveyDate}` : ''}` })),
                  accuracyClasses: ACCURACY_CLASSES.map((a) => ({ value: a, label: ACCURACY_CLASS_LABELS[a] })),
                }}
              />
            </div>
          )}
          {d.corrections.length === 0 ? (
            <p className="text-sm text-ink-soft">No corrections on this stretch.</p>
          ) : (
            <ul className="divide-y divide-ink/10 text-sm" aria-label="Corrections of this stretch">
              {d.corrections.map((c) => (
                <li key={c.id} className="flex flex-wrap items-center justify-between gap-3 py-2">
                  <span>
                    <span className="font-medium">{KIND_TEXT[c.kind]}</span>
                    {c.kind === 'split' || c.kind === 'merge' ? ` at ${c.fromChainageM?.toFixed(1)} m` : c.fromChainageM !== null && c.kind !== 'promote' ? `, ${c.fromChainageM.toFixed(1)}–${c.toChainageM?.toFixed(1)} m` : ''}
                    {c.targetRouteRef ? ` → ${c.targetRouteRef}` : ''}
                    {c.kind === 'promote' ? ` as ${c.plannedRouteRef}` : ''}: “{c.reason}” — {c.createdByName ?? 'someone'}, {formatInZone(c.createdAt, project.timeZone)}
                    {c.withdrawnAt && <> <Badge tone="muted">withdrawn</Badge></>}
                  </span>
                  {engineer && !c.withdrawnAt && c.kind !== 'promote' && <WithdrawCorrection id={c.id} />}
                </li>
              ))}
            </ul>
          )}
        </Card>
      </div>
    </>
  );
}
