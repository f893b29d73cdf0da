import type { Metadata } from 'next';
import Link from 'next/link';
import { getDb } from '@/db/client';
import { listPhotos, type Photo } from '@/db/photos';
import { listPlannedRoutes } from '@/db/planned';
import { listAnchorRoutes } from '@/db/record-anchors';
import { listRoadCrossings } from '@/db/road-crossings';
import { isUuid } from '@/lib/api/with-route';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { formatQuantity, shownSystem, type UnitSystem } from '@/lib/records/units';
import { PLANNED_COLOUR } from '@/lib/records/section-status';
import { formatInZone } from '@/lib/records/zoned-time';
import { Badge, Card, PageHeader } from '@/components/ui/primitives';
import { DataTable, type Column, type Row } from '@/components/ui/data-table';
import { PlacePicker } from '@/components/map/place-picker';
import { PhotoEditForm } from '@/components/forms/photo-edit-form';
import { PhotoUploadForm } from '@/components/forms/photo-upload-form';

export const metadata: Metadata = { title: 'Photos' };

const PLACED_BY: Record<Photo['placedBy'], string> = {
  exif: 'its own GPS position', hand: 'placed by hand', chainage: 'typed chainage', crossing: 'at its road crossing', pit: 'at its test pit',
};

const COLUMNS: Column[] = [
  { key: 'file', label: 'Photo' },
  { key: 'place', label: 'Place', priority: 1 },
  { key: 'placedBy', label: 'Placed by' },
  { key: 'shows', label: 'Shows' },
  { key: 'taken', label: 'Taken', priority: 3 },
  { key: 'caption', label: 'Caption', priority: 3 },
];

const placeText = (p: Photo, system: UnitSystem) => `${p.routeRef} at ${formatQuantity(p.chainageM, 'length', system)}`;

/** The project's photos as a grid of thumbnails (captions, places, originals) and a table; the upload form for phones. */
export default async function PhotosPage({ params, searchParams }: { params: Promise<{ projectId: string }>; searchParams: Promise<{ crossing?: string }> }) {
  const { projectId } = await params;
  const { crossing } = await searchParams;
  const { me, project } = await requireProjectPage(projectId, 'record.read');
  const db = getDb();
  const crossingId = isUuid(crossing) ? crossing : undefined;
  const [photos, routes, crossings, lines] = await Promise.all([listPhotos(db, project.id, { crossingId }), listAnchorRoutes(db, project.id), listRoadCrossings(db, project.id), listPlannedRoutes(db, project.id)]);
  const system = shownSystem(me.unitSystem, project.unitSystem);
  const canWrite = can(me.role, 'record.write') && me.organisationId === project.contractorOrgId;
  const base = `/projects/${project.id}`;
  const filtered = crossingId ? crossings.find((c) => c.id === crossingId) : undefined;
  const routeOptions = routes.filter((r) => !r.removed).map((r) => ({ id: r.id, ref: r.ref, street: r.street, lengthM: r.lengthM }));
  const routeLines = {
    type: 'FeatureCollection' as const,
    features: lines.map((r) => ({ type: 'Feature' as const, properties: { ref: r.ref }, geometry: { type: 'LineString' as const, coordinates: r.coords } })),
  };
  const photoPoints = {
    type: 'FeatureCollection' as const,
    features: photos.map((p) => ({ type: 'Feature' as const, properties: { caption: p.caption }, geometry: { type: 'Point' as const, coordinates: [p.lon, p.lat] } })),
  };
  const taken = (p: Photo) => (p.takenAt ? formatInZone(p.takenAt, project.timeZone).slice(0, 16) : '—');

  const rows: Row[] = photos.map((p) => ({
    id: p.id,
    cells: {
      file: { text: p.fileName, href: p.originalUrl },
      place: { text: placeText(p, system), sort: `${p.routeRef} ${p.chainageM.toFixed(2).padStart(10, '0')}` },
      placedBy: PLACED_BY[p.placedBy],
      shows: p.crossingRef ? `road crossing ${p.crossingRef}` : p.pitId ? 'a test pit' : '—',
      taken: taken(p),
      caption: p.caption || '—',
    },
  }));

  return (
    <>
      <PageHeader
        title="Photos"
        subtitle={
          <>
            {filtered ? <>Photos of road crossing {filtered.routeRef}. <Link className="underline" href={`${base}/records/photos`}>All photos</Link> · </> : null}
            Placed from their GPS position or by hand, on a stretch, a road crossing or a test pit. <Link href={`${base}/records`} className="underline">All records</Link>
          </>
        }
      />
      <div className="flex flex-col gap-6">
        {photos.length > 0 && lines.length > 0 && <PlacePicker label="Map of the photos and the planned routes" routes={routeLines} photos={photoPoints} routeColour={PLANNED_COLOUR} />}
        {photos.length > 0 && (
          <ul className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-4" aria-label="Photo thumbnails">
            {photos.map((p) => (
              <li key={p.id} className="overflow-hidden rounded-md border border-ink/10 bg-white">
                <a href={p.originalUrl} title={`Open the original (${(p.sizeBytes / 1048576).toFixed(1)} MB)`}>
                  <img src={p.thumbnailUrl} alt={p.caption || p.fileName} loading="lazy" className="aspect-[4/3] w-full bg-ink/5 object-cover" />
                </a>
                <div className="flex flex-col gap-1 p-2 text-sm">
                  <span className="font-medium">{p.caption || p.fileName}</span>
                  <span className="text-ink-soft">
                    {placeText(p, system)} · {PLACED_BY[p.placedBy]}
                  </span>
                  {p.routeRemoved && <Badge tone="warn">route removed from plan</Badge>}
                  {p.crossingRef && <span className="text-ink-soft">Road crossing {p.crossingRef}</span>}
                  <a className="underline" href={`${p.originalUrl}?download=1`}>
                    Download original
                  </a>
                  {canWrite && (
                    <details>
                      <summary className="cursor-pointer py-2 underline">Change caption or place</summary>
                      <PhotoEditForm projectId={project.id} photo={{ id: p.id, caption: p.caption, fileName: p.fileName }} routes={routeOptions} system={system} />
                    </details>
                  )}
                </div>
              </li>
            ))}
          </ul>
        )}
        <DataTable columns={COLUMNS} rows={rows} label="Photos" empty={filtered ? 'No photo shows this crossing yet.' : 'No photos yet.'} />
        {canWrite ? (
          <Card title="Add a photo">
            <PhotoUploadForm
              projectId={project.id}
              system={system}
              map={lines.length > 0 ? { routes: routeLines, colour: PLANNED_COLOUR } : undefined}
              routes={routes.filter((r) => !r.removed).map((r) => ({ id: r.id, label: `${r.ref}${r.street ? ` · ${r.street}` : ''} (${formatQuantity(r.lengthM, 'length', system)})` }))}
              crossings={crossings.filter((c) => !c.routeRemoved).map((c) => ({ id: c.id, label: `${c.routeRef}${c.addressRef ? ` · ${c.addressRef}` : ''}` }))}
            />
          </Card>
        ) : (
          <p className="text-sm text-ink-soft">
            <Badge tone="muted">read only</Badge> The contractor&apos;s surveyors and engineers add photos.
          </p>
        )}
      </div>
    </>
  );
}
