import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { getDb } from '@/db/client';
import { getUpload, listUploadExclusions, listUploadFiles, uploadFeatureCollection } from '@/db/uploads';
import { isUuid } from '@/lib/api/with-route';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { ACCURACY_CLASS_LABELS, R95_FACTOR } from '@/lib/records/accuracy-classes';
import { formatLength } from '@/lib/records/units';
import { DataTable } from '@/components/ui/data-table';
import { Badge, Card, Notice, PageHeader } from '@/components/ui/primitives';
import { GeoMap, type MapLayer } from '@/components/map/geo-map';
import { WithdrawUpload } from '@/components/forms/withdraw-upload';
import { plannedFeatureCollection } from '@/lib/services/planned';
import { SupersedeUpload } from '@/components/forms/supersede-upload';
import { ExcludeRange } from '@/components/forms/exclude-range';

export const metadata: Metadata = { title: 'Upload' };

/** The project's extent as a dashed outline, so a file in the wrong place shows at once. */
function extentLayer(extent: [number, number, number, number] | null): MapLayer[] {
  if (!extent) return [];
  const [w, s, e, n] = extent;
  const ring = [[w, s], [e, s], [e, n], [w, n], [w, s]];
  return [{ id: 'extent', colour: '#7b8a92', dashed: true, width: 1.5, data: { type: 'FeatureCollection', features: [{ type: 'Feature', properties: {}, geometry: { type: 'LineString', coordinates: ring } }] } }];
}

export default async function UploadPage({ params }: { params: Promise<{ projectId: string; uploadId: string }> }) {
  const { projectId, uploadId } = await params;
  const { me, project } = await requireProjectPage(projectId, 'upload.read');
  const db = getDb();
  const upload = isUuid(uploadId) ? await getUpload(db, uploadId) : undefined;
  if (!upload || upload.projectId !== project.id) notFound();
  const [files, geometry, planned, exclusions] = await Promise.all([listUploadFiles(db, upload.id), uploadFeatureCollection(db, upload.id), plannedFeatureCollection(db, project.id, false), listUploadExclusions(db, upload.id)]);
  const facts: [string, string][] = [
    ['Format', upload.format ?? '—'],
    ['Coordinate system of the file', upload.crs ?? '—'],
    ['Features / points', `${upload.featureCount} / ${upload.pointCount}`],
    ['Accuracy', `${ACCURACY_CLASS_LABELS[upload.accuracyClass]}: σ ${formatLength(upload.sigmaM, project.unitSystem)} per axis, 95 % radius ${formatLength(upload.sigmaM * R95_FACTOR, project.unitSystem)}`],
    ['Survey date', upload.surveyDate ?? '—'],
    ['Crew', upload.crew || '—'],
    ['Shows', upload.content.replace('_', ' ')],
    ['Uploaded by', `${upload.uploadedByName ?? '—'}, ${new Date(upload.createdAt).toLocaleString('en-GB', { timeZone: project.timeZone })}`],
    ['SHA-256', upload.sha256],
  ];
  const attributeKeys = [...new Set(geometry.features.flatMap((f) => Object.keys(f.properties).filter((k) => !['seq', 'kind', 'name', 'pointCount'].includes(k))))].slice(0, 6);
  return (
    <>
      <PageHeader
        title={upload.fileName}
        subtitle={<Badge tone={upload.status === 'stored' ? 'ok' : upload.status === 'failed' ? 'bad' : 'muted'}>{upload.status}</Badge>}
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
        {upload.error && <Notice tone="bad"><span className="font-medium">{upload.error.code}:</span> {upload.error.message}</Notice>}
        {upload.warnings.length > 0 && <Notice tone="warn">{upload.warnings.join(' · ')}</Notice>}
        {upload.supersededBy && <Notice tone="info">Superseded by <a href={`/projects/${project.id}/uploads/${upload.supersededBy}`}>a corrected upload</a>.</Notice>}
        {geometry.features.length > 0 && <GeoMap label="Map of the upload" layers={[...extentLayer(project.extent), { id: 'planned', data: planned, colour: '#999999', dashed: true, width: 2 }, { id: 'upload', data: geometry, colour: '#0072b2' }]} />}
        <div className="grid gap-6 lg:grid-cols-2">
          <Card title="About this upload">
            <dl className="space-y-2 text-sm">
              {facts.map(([k, v]) => (
                <div key={k} className="grid grid-cols-3 gap-2">
                  <dt className="text-ink-faint">{k}</dt>
                  <dd className="col-span-2 break-all">{v}</dd>
                </div>
              ))}
            </dl>
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
        {(exclusions.length > 0 || (upload.status === 'stored' && can(me.role, 'reconcile.run'))) && (
          <Card title="Left out of matching">
            {exclusions.length > 0 && (
              <ul className="mb-4 space-y-1 text-sm">
                {exclusions.map((e) => (
                  <li key={e.id}>
                    {e.kind === 'time' ? `${new Date(String(e.from)).toLocaleString('en-GB', { timeZone: project.timeZone })} – ${new Date(String(e.to)).toLocaleString('en-GB', { timeZone: project.timeZone })}` : `${e.from} – ${e.to} m along the trace`}: {e.reason}
                  </li>
                ))}
              </ul>
            )}
            {upload.status === 'stored' && can(me.role, 'reconcile.run') && <ExcludeRange projectId={project.id} uploadId={upload.id} />}
          </Card>
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
