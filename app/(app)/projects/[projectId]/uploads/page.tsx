import type { Metadata } from 'next';
import { getDb } from '@/db/client';
import { listUploads } from '@/db/uploads';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { ACCURACY_CLASS_LABELS } from '@/lib/records/accuracy-classes';
import { DataTable } from '@/components/ui/data-table';
import { Card, PageHeader } from '@/components/ui/primitives';
import { UploadPanel } from '@/components/forms/upload-panel';
import { explainRefusal, warningWords } from '@/components/ui/upload-words';

export const metadata: Metadata = { title: 'Field uploads' };

const STATUS_TONE = { stored: 'ok', failed: 'bad', withdrawn: 'muted', superseded: 'muted' } as const;
const STATUS_WORD = { stored: 'stored', failed: 'refused', withdrawn: 'withdrawn', superseded: 'superseded' } as const;

export default async function UploadsPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { me, project } = await requireProjectPage(projectId, 'upload.read');
  const uploads = await listUploads(getDb(), project.id);
  const fmt = new Intl.DateTimeFormat('en-GB', { dateStyle: 'short', timeStyle: 'short', timeZone: project.timeZone });
  return (
    <>
      <PageHeader title="Field uploads" subtitle="GPS traces, RTK and total-station points, KML, shapefiles and GeoJSON of what was laid. Originals are kept byte for byte." />
      {can(me.role, 'upload.create') && (
        <div className="mb-8">
          <Card title="Add files">
            <UploadPanel projectId={project.id} defaultAccuracy={project.defaultAccuracyClass} defaultCrs={project.defaultCrs} />
          </Card>
        </div>
      )}
      <DataTable
        label="Uploads"
        empty="Nothing uploaded yet."
        columns={[
          { key: 'file', label: 'File' },
          { key: 'status', label: 'Status', priority: 1 },
          { key: 'format', label: 'Format and grid' },
          { key: 'points', label: 'Positions', align: 'right' },
          { key: 'accuracy', label: 'Accuracy' },
          { key: 'surveyed', label: 'Survey date' },
          { key: 'when', label: 'Uploaded' },
          { key: 'notes', label: 'Notes' },
        ]}
        rows={uploads.map((u) => ({
          id: u.id,
          cells: {
            file: { text: u.fileName, href: `/projects/${project.id}/uploads/${u.id}` },
            status: { text: STATUS_WORD[u.status], tone: STATUS_TONE[u.status] },
            format: u.format ? `${u.format.toUpperCase()}${u.crs ? ` · ${u.crs}` : ''}` : '—',
            points: u.pointCount,
            accuracy: `${ACCURACY_CLASS_LABELS[u.accuracyClass]} (±${u.sigmaM} m)`,
            surveyed: u.surveyDate ?? '—',
            when: { text: `${fmt.format(new Date(u.createdAt))}${u.uploadedByName ? `, ${u.uploadedByName}` : ''}`, sort: u.createdAt },
            notes: u.error ? explainRefusal(u.error.code, u.error.message, project.defaultCrs).text : u.warnings.map(warningWords).join(' '),
          },
        }))}
      />
    </>
  );
}
