import type { Metadata } from 'next';
import { getDb } from '@/db/client';
import { listPlanVersions } from '@/db/planned';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { formatLength } from '@/lib/records/units';
import { plannedFeatureCollection } from '@/lib/services/planned';
import { DataTable } from '@/components/ui/data-table';
import { Card, Notice, PageHeader } from '@/components/ui/primitives';
import { GeoMap } from '@/components/map/geo-map';
import { PlanImport } from '@/components/forms/plan-import';
import { plural, warningWords } from '@/components/ui/upload-words';

export const metadata: Metadata = { title: 'Planned network' };

const DIAGNOSTIC_LABELS: Record<string, string> = {
  dangling_end: 'Ends without joining',
  duplicate: 'Duplicate line',
  overlap: 'Overlapping lines',
  zero_length: 'Zero length',
  duplicate_ref: 'Reference used twice',
};

export default async function PlanPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { me, project } = await requireProjectPage(projectId, 'plan.read');
  const db = getDb();
  const [versions, collection] = await Promise.all([listPlanVersions(db, project.id), plannedFeatureCollection(db, project.id, true)]);
  const current = { ...collection, features: collection.features.filter((f) => f.properties.removedInVersion === null) };
  const streets = { ...current, features: current.features.filter((f) => f.properties.kind === 'street') };
  const crossings = { ...current, features: current.features.filter((f) => f.properties.kind === 'crossing') };
  const latest = versions[0];
  const total = current.features.reduce((n, f) => n + f.properties.lengthM, 0);
  return (
    <>
      <PageHeader
        title="Planned network"
        subtitle={latest ? `Version ${latest.version}: ${plural(current.features.length, 'route')}, ${formatLength(total, project.unitSystem)} planned.` : 'No design imported yet.'}
      />
      <div className="space-y-6">
        {can(me.role, 'plan.import') && (
          <Card title={latest ? 'Import a revised design' : 'Import the design'}>
            <PlanImport projectId={project.id} defaultCrs={project.defaultCrs} />
          </Card>
        )}
        {current.features.length > 0 && (
          <GeoMap
            label="Map of the planned network"
            layers={[
              { id: 'streets', data: streets, colour: '#0072b2', dashed: true, width: 2.5 },
              { id: 'crossings', data: crossings, colour: '#cc79a7', dashed: true, width: 2.5 },
            ]}
          />
        )}
        {latest && latest.diagnostics.length > 0 && (
          <Card title={`For the engineer: ${latest.diagnostics.length === 1 ? '1 thing' : `${latest.diagnostics.length} things`} to check in version ${latest.version}`}>
            <ul className="space-y-1 text-sm">
              {latest.diagnostics.map((d, i) => (
                <li key={i}>
                  <span className="font-medium">{DIAGNOSTIC_LABELS[d.kind] ?? d.kind}</span> ({d.refs.join(', ')}): {d.message}{' '}
                  <span className="text-ink-faint">at {d.position[1].toFixed(6)}, {d.position[0].toFixed(6)}</span>
                </li>
              ))}
            </ul>
          </Card>
        )}
        {latest?.warnings.length ? <Notice tone="warn">{latest.warnings.map(warningWords).join(' ')}</Notice> : null}
        <DataTable
          label="Planned routes"
          empty="No routes yet."
          columns={[
            { key: 'ref', label: 'Route' },
            { key: 'street', label: 'Street' },
            { key: 'kind', label: 'Kind' },
            { key: 'ducts', label: 'Planned ducts' },
            { key: 'length', label: 'Length', align: 'right' },
            { key: 'since', label: 'Since version', align: 'right' },
            { key: 'state', label: 'State' },
          ]}
          rows={collection.features.map((f) => ({
            id: String(f.id),
            cells: {
              ref: f.properties.ref,
              street: f.properties.street ?? '',
              kind: f.properties.kind === 'crossing' ? 'road crossing' : 'street route',
              ducts: f.properties.ducts ?? '',
              length: { text: formatLength(f.properties.lengthM, project.unitSystem), sort: f.properties.lengthM },
              since: f.properties.firstVersion,
              state: f.properties.removedInVersion ? { text: `removed in v${f.properties.removedInVersion}`, tone: 'warn' } : { text: f.properties.geometryVersion > f.properties.firstVersion ? `reshaped in v${f.properties.geometryVersion}` : 'current', tone: 'ok' },
            },
          }))}
        />
        {versions.length > 0 && (
          <Card title="Versions">
            <ul className="space-y-2 text-sm">
              {versions.map((v) => (
                <li key={v.id}>
                  <span className="font-medium">Version {v.version}</span> — {v.fileName} ({v.format?.toUpperCase()}, {v.crs}), {plural(v.routeCount, 'route')}, by {v.importedByName ?? '—'} on{' '}
                  {new Date(v.createdAt).toLocaleString('en-GB', { timeZone: project.timeZone })}. Changes: {v.changes.added.length} added, {v.changes.removed.length} removed,{' '}
                  {v.changes.reshaped.length} reshaped, {v.changes.retagged.length} retagged.
                  {v.changes.removed.length > 0 && <span className="text-ink-soft"> Removed: {v.changes.removed.join(', ')}.</span>}
                  {v.changes.reshaped.length > 0 && <span className="text-ink-soft"> Reshaped: {v.changes.reshaped.join(', ')}.</span>}
                </li>
              ))}
            </ul>
          </Card>
        )}
      </div>
    </>
  );
}
