import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { getDb } from '@/db/client';
import { z } from 'zod';
import { getUpload, listUploadFiles, uploadFeatureCollection } from '@/db/uploads';
import { isUuid } from '@/lib/api/with-route';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { ACCURACY_CLASS_LABELS, ACCURACY_CLASSES, DEFAULT_SIGMA_M, R95_FACTOR } from '@/lib/records/accuracy-classes';
import { formatLength } from '@/lib/records/units';
import { explainRefusal, plural } from '@/components/ui/upload-words';
import { DataTable } from '@/components/ui/data-table';
import { Badge, Card, Notice, PageHeader } from '@/components/ui/primitives';
import { GeoMap, type MapLayer } from '@/components/map/geo-map';
import { WithdrawUpload } from '@/components/forms/withdraw-upload';
import { UploadAccuracyForm } from '@/components/forms/upload-accuracy-form';
import { plannedFeatureCollection } from '@/lib/services/planned';
import { SupersedeUpload } from '@/components/forms/supersede-upload';
import { ExcludeRange, RemoveExclusion } from '@/components/forms/exclude-range';
import { uploadFixOverview } from '@/lib/services/exclusions';
import { formatInZone } from '@/lib/records/zoned-time';

export const metadata: Metadata = { title: 'Upload' };

/** The project's extent as a dashed outline, so a file in the wrong place shows at once. */
function extentLayer(extent: [number, number, number, number] | null): MapLayer[] {
  if (!extent) return [];
  const [w, s, e, n] = extent;
  const ring = [[w, s], [e, s], [e, n], [w, n], [w, s]];
  return [{ id: 'extent', colour: '#7b8a92', dashed: true, width: 1.5, data: { type: 'FeatureCollection', features: [{ type: 'Feature', properties: {}, geometry: { type: 'LineString', coordinates: ring } }] } }];
}

// a stretch handed over from a section page: its first and last fix time, epoch seconds
const handedOver = z.object({ from: z.coerce.number().finite().min(0), to: z.coerce.number().finite().min(0) });

export default async function UploadPage({ params, searchParams }: { params: Promise<{ projectId: string; uploadId: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { projectId, uploadId } = await params;
  const stretch = handedOver.safeParse(await searchParams);
  const { me, project } = await requireProjectPage(projectId, 'upload.read');
  const db = getDb();
  const upload = isUuid(uploadId) ? await getUpload(db, uploadId) : undefined;
  if (!upload || upload.projectId !== project.id) notFound();
  const [files, geometry, planned, fixes] = await Promise.all([listUploadFiles(db, upload.id), uploadFeatureCollection(db, upload.id), plannedFeatureCollection(db, project.id, false), uploadFixOverview(db, upload.id)]);
  const exclusions = fixes.exclusions;
  // every time on this page is on the project's clock, in one form: 2026-11-05 10:00:38
  const tz = project.timeZone;
  const at = (iso: string | number) => formatInZone(typeof iso === 'number' ? iso * 1000 : iso, tz);
  const engineer = upload.status === 'stored' && can(me.role, 'reconcile.run');
  // the contractor's people set the accuracy afterwards; a withdrawn or superseded upload keeps its own
  const canSetAccuracy = can(me.role, 'upload.manage') && me.organisationId === project.contractorOrgId && (upload.status === 'stored' || upload.status === 'failed');
  // times along the trace: about six marks a trace, from its first fix to its last
  const marks = [...new Set(fixes.fixes.map((f) => f.trace))].map((k) => {
    const own = fixes.fixes.filter((f) => f.trace === k && f.t !== null);
    const step = Math.max(1, Math.ceil((own.length - 1) / 5));
    return { trace: k, marks: own.filter((_, i) => i % step === 0 || i === own.length - 1) };
  }).filter((m) => m.marks.length > 0);
  const facts: [string, string][] = [
    ['Format', upload.format ?? '—'],
    ['Coordinate system of the file', upload.crs ?? '—'],
    ['Contents', `${plural(upload.featureCount, 'line or point', 'lines and points')}, ${plural(upload.pointCount, 'position')}`],
    ['Accuracy', `${ACCURACY_CLASS_LABELS[upload.accuracyClass]}: a typical error of ${formatLength(upload.sigmaM, project.unitSystem)} east–west and north–south (one standard deviation); 95 % of positions within ${formatLength(upload.sigmaM * R95_FACTOR, project.unitSystem)}`],
    ['Survey date', upload.surveyDate ?? '—'],
    ['Crew', upload.crew || '—'],
    ['Shows', upload.content.replace('_', ' ')],
    ['Fixes', `${fixes.total} in ${fixes.traces} trace${fixes.traces === 1 ? '' : 's'}${fixes.span ? `, from ${at(fixes.span.firstT)} to ${at(fixes.span.lastT)} (${tz})` : ', without times'}`],
    ['Uploaded by', `${upload.uploadedByName ?? '—'}, ${at(upload.createdAt)} (${tz})`],
    ['SHA-256', upload.sha256],
  ];
  const attributeKeys = [...new Set(geometry.features.flatMap((f) => Object.keys(f.properties).filter((k) => !['seq', 'kind', 'name', 'pointCount'].includes(k))))].slice(0, 6);
  return (
    <>
      <PageHeader
        title={upload.fileName}
        subtitle={<Badge tone={upload.status === 'stored' ? 'ok' : upload.status === 'failed' ? 'bad' : 'muted'}>{upload.status === 'failed' ? 'refused' : upload.status}</Badge>}
        actions={
          upload.status === 'stored' && can(me.role, 'upload.manage') ? (
            <>
              <SupersedeUpload projectId={project.id} uploadId={upload.id} />
              <WithdrawUpload projectId={project.id} uploadId={upload.id} />
            </>
          ) : undefined
        }
      />
      <div className="space-y-6">
        {upload.error && <Notice tone="bad">{explainRefusal(upload.error.code, upload.error.message, project.defaultCrs).text}</Notice>}
        {upload.warnings.length > 0 && <Notice tone="warn">{upload.warnings.join(' · ')}</Notice>}
        {upload.supersededBy && <Notice tone="info">Superseded by <a href={`/projects/${project.id}/uploads/${upload.supersededBy}`}>a corrected upload</a>.</Notice>}
        {geometry.features.length > 0 && <GeoMap label="Map of the upload" layers={[...extentLayer(project.extent), { id: 'planned', data: planned, colour: '#999999', dashed: true, width: 2 }, { id: 'upload', data: geometry, colour: '#0072b2' }]} />}
        <div className="grid gap-6 lg:grid-cols-2">
          <Card title="About this upload">
            <dl className="space-y-2 text-sm">
              {facts.map(([k, v]) => (
                <div key={k} className="grid grid-cols-3 gap-2">
                  <dt className="text-ink-faint">{k}</dt>
                  <dd className={`col-span-2 ${k === 'SHA-256' ? 'break-all' : 'break-words'}`}>{v}</dd>
                </div>
              ))}
            </dl>
            {canSetAccuracy && (
              <UploadAccuracyForm projectId={project.id} uploadId={upload.id} current={upload.accuracyClass}
                sigmas={Object.fromEntries(ACCURACY_CLASSES.map((c) => [c, project.accuracySigmas[c] ?? DEFAULT_SIGMA_M[c]])) as Record<(typeof ACCURACY_CLASSES)[number], number>} />
            )}
          </Card>
          <Card title="Original files">
            <ul className="space-y-2 text-sm">
              {files.map((f, i) => (
                <li key={f.storageKey}>
                  <a href={`/api/projects/${project.id}/uploads/${upload.id}/original?part=${i}`}>{f.fileName}</a>{' '}
                  <span className="text-ink-faint">({(f.sizeBytes / 1024).toFixed(1)} kB)</span>
                </li>
              ))}
            </ul>
          </Card>
        </div>
        {(exclusions.length > 0 || engineer || marks.length > 0) && (
          <section id="left-out" className="scroll-mt-4">
            <Card title="Fix times and stretches left out of matching">
              <p className="mb-3 text-sm text-ink-soft">Times are on the project&apos;s clock ({tz}), whatever the clock of this computer.</p>
              {marks.length > 0 && (
                <div className="mb-4 text-sm">
                  <h3 className="mb-1 font-medium">Times along the trace</h3>
                  <ul className="space-y-1" aria-label="Times along the trace">
                    {marks.map((m) => (
                      <li key={m.trace} className="flex flex-wrap gap-x-3 gap-y-1">
                        {fixes.traces > 1 && <span className="text-ink-faint">trace {m.trace + 1}:</span>}
                        {m.marks.map((f, i) => (
                          <span key={i} className="tabular-nums">{at(f.t!)} <span className="text-ink-faint">at {f.alongM.toFixed(0)} m</span></span>
                        ))}
                      </li>
                    ))}
                  </ul>
                </div>
              )}
              {exclusions.length > 0 && (
                <ul className="mb-4 divide-y divide-ink/10 text-sm" aria-label="Stretches left out of matching">
                  {exclusions.map((e) => (
                    <li key={e.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
                      <span>
                        <span className="font-medium tabular-nums">{e.kind === 'time' ? `${at(String(e.from))} to ${at(String(e.to))}` : `${e.from} to ${e.to} m along each trace`}</span>
                        : {e.reason} <span className="text-ink-faint">({e.fixesLeftOut} fixes; {e.createdByName ?? 'someone'}, {e.createdAt ? at(e.createdAt) : ''})</span>
                      </span>
                      {engineer && <RemoveExclusion projectId={project.id} uploadId={upload.id} exclusionId={e.id} />}
                    </li>
                  ))}
                </ul>
              )}
              {engineer && (
                <ExcludeRange
                  projectId={project.id}
                  uploadId={upload.id}
                  timeZone={tz}
                  fixes={fixes.fixes}
                  planned={planned}
                  initial={stretch.success ? { fromT: stretch.data.from, toT: stretch.data.to } : undefined}
                />
              )}
            </Card>
          </section>
        )}
        <DataTable
          label="Features"
          columns={[{ key: 'seq', label: '#', align: 'right' }, { key: 'kind', label: 'Kind' }, { key: 'name', label: 'Name' }, { key: 'points', label: 'Points', align: 'right' }, ...attributeKeys.map((k) => ({ key: `a:${k}`, label: k }))]}
          rows={geometry.features.slice(0, 2000).map((f) => ({
            id: String(f.id),
            cells: {
              seq: f.properties.seq + 1,
              kind: f.properties.kind,
              name: f.properties.name ?? '',
              points: f.properties.pointCount,
              ...Object.fromEntries(attributeKeys.map((k) => [`a:${k}`, f.properties[k] === undefined || f.properties[k] === null ? '' : String(f.properties[k])])),
            },
          }))}
        />
      </div>
    </>
  );
}
