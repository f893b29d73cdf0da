import type { Db } from './client';
import { recordsOnSection } from './record-anchors';
import type { PointAnchor } from '@/lib/records/anchor';

export type PhotoPlacement = 'exif' | 'hand' | 'chainage' | 'crossing' | 'pit';

/** A photo as the API and the pages see it (the files are fetched through its urls). */
export interface Photo {
  id: string;
  projectId: string;
  routeId: string;
  routeRef: string;
  routeRemoved: boolean;
  chainageM: number;
  offsetM: number;
  lon: number;
  lat: number;
  placedBy: PhotoPlacement;
  crossingId: string | null;
  /** the crossing route's reference, when attached to a crossing */
  crossingRef: string | null;
  pitId: string | null;
  takenAt: string | null;
  caption: string;
  fileName: string;
  mimeType: 'image/jpeg' | 'image/png';
  sizeBytes: number;
  sha256: string;
  width: number;
  height: number;
  originalUrl: string;
  thumbnailUrl: string;
  createdByName: string | null;
  createdAt: string;
  updatedAt: string;
}

/** Where the files of a photo lie in the originals store (not part of the DTO). */
export interface PhotoFiles {
  storageKey: string;
  thumbnailKey: string;
  fileName: string;
  mimeType: string;
  sizeBytes: number;
  sha256: string;
}

export interface NewPhoto {
  id: string;
  projectId: string;
  anchor: PointAnchor;
  placedBy: PhotoPlacement;
  crossingId: string | null;
  pitId: string | null;
  takenAt: string | null;
  caption: string;
  fileName: string;
  mimeType: string;
  sizeBytes: number;
  sha256: string;
  width: number;
  height: number;
  storageKey: string;
  thumbnailKey: string;
}

const columns = (db: Db) => [
  'rec.id', 'rec.project_id', 'rec.route_id', 'r.ref as route_ref', 'r.removed_in_version', 'rec.chainage_m', 'rec.offset_m',
  db.raw('ST_X(rec.geom) as lon'), db.raw('ST_Y(rec.geom) as lat'), 'rec.placed_by', 'rec.crossing_id', 'cr.ref as crossing_ref', 'rec.pit_id',
  'rec.taken_at', 'rec.caption', 'rec.file_name', 'rec.mime_type', 'rec.size_bytes', 'rec.sha256', 'rec.width', 'rec.height',
  'u.name as created_by_name', 'rec.created_at', 'rec.updated_at',
];

const toDto = (r: Record<string, any>): Photo => {
  const base = `/api/projects/${r.project_id}/photos/${r.id}`;
  return {
    id: r.id, projectId: r.project_id, routeId: r.route_id, routeRef: r.route_ref, routeRemoved: r.removed_in_version !== null,
    chainageM: r.chainage_m, offsetM: r.offset_m, lon: r.lon, lat: r.lat, placedBy: r.placed_by, crossingId: r.crossing_id,
    crossingRef: r.crossing_ref ?? null, pitId: r.pit_id, takenAt: r.taken_at ? r.taken_at.toISOString() : null, caption: r.caption,
    fileName: r.file_name, mimeType: r.mime_type, sizeBytes: Number(r.size_bytes), sha256: r.sha256, width: r.width, height: r.height,
    originalUrl: `${base}/original`, thumbnailUrl: `${base}/thumbnail`, createdByName: r.created_by_name ?? null,
    createdAt: r.created_at.toISOString(), updatedAt: r.updated_at.toISOString(),
  };
};

const joins = <Q extends ReturnType<Db>>(q: Q) =>
  q
    .leftJoin('road_crossings as c', 'c.id', 'rec.crossing_id')
    .leftJoin('planned_routes as cr', 'cr.id', 'c.route_id')
    .leftJoin('users as u', 'u.id', 'rec.created_by');

const base = (db: Db) => joins(db('photos as rec').join('planned_routes as r', 'r.id', 'rec.route_id'));

export async function getPhoto(db: Db, id: string): Promise<Photo | undefined> {
  const row = await base(db).where('rec.id', id).first(columns(db));
  return row && toDto(row);
}

export async function getPhotoFiles(db: Db, id: string): Promise<PhotoFiles | undefined> {
  const r = await db('photos').where({ id }).first('storage_key', 'thumbnail_key', 'file_name', 'mime_type', 'size_bytes', 'sha256');
  return r && { storageKey: r.storage_key, thumbnailKey: r.thumbnail_key, fileName: r.file_name, mimeType: r.mime_type, sizeBytes: Number(r.size_bytes), sha256: r.sha256 };
}

export async function findPhotoBySha(db: Db, projectId: string, sha256: string): Promise<Photo | undefined> {
  const row = await base(db).where({ 'rec.project_id': projectId, 'rec.sha256': sha256 }).first(columns(db));
  return row && toDto(row);
}

/** The project's photos, newest first; `crossingId` or `pitId` narrow to what one record shows. */
export async function listPhotos(db: Db, projectId: string, filter: { crossingId?: string; pitId?: string; routeId?: string } = {}): Promise<Photo[]> {
  const q = base(db).where('rec.project_id', projectId);
  if (filter.crossingId) q.andWhere('rec.crossing_id', filter.crossingId);
  if (filter.pitId) q.andWhere('rec.pit_id', filter.pitId);
  if (filter.routeId) q.andWhere('rec.route_id', filter.routeId);
  const rows = await q.orderBy([{ column: 'rec.created_at', order: 'desc' }, { column: 'rec.id' }]).select(columns(db));
  return rows.map(toDto);
}

/** Inserts the row; false when the project already has a photo with these bytes (a race the unique index settles). */
export async function insertPhotoOnce(db: Db, p: NewPhoto, userId: string): Promise<boolean> {
  const rows = await db('photos')
    .insert({
      id: p.id, project_id: p.projectId, route_id: p.anchor.routeId, chainage_m: p.anchor.chainageM, offset_m: p.anchor.offsetM,
      geom: db.raw('ST_SetSRID(ST_MakePoint(?, ?), 4326)', [p.anchor.position[0], p.anchor.position[1]]), placed_by: p.placedBy,
      crossing_id: p.crossingId, pit_id: p.pitId, taken_at: p.takenAt, caption: p.caption, file_name: p.fileName, mime_type: p.mimeType,
      size_bytes: p.sizeBytes, sha256: p.sha256, width: p.width, height: p.height, storage_key: p.storageKey, thumbnail_key: p.thumbnailKey,
      created_by: userId, updated_by: userId,
    })
    .onConflict(['project_id', 'sha256'])
    .ignore()
    .returning('id');
  return rows.length === 1;
}

export async function updatePhoto(db: Db, id: string, v: { caption: string; anchor: PointAnchor; placedBy: PhotoPlacement; crossingId: string | null; pitId: string | null }, userId: string): Promise<void> {
  await db('photos').where({ id }).update({
    caption: v.caption, route_id: v.anchor.routeId, chainage_m: v.anchor.chainageM, offset_m: v.anchor.offsetM,
    geom: db.raw('ST_SetSRID(ST_MakePoint(?, ?), 4326)', [v.anchor.position[0], v.anchor.position[1]]), placed_by: v.placedBy,
    crossing_id: v.crossingId, pit_id: v.pitId, updated_by: userId, updated_at: db.fn.now(),
  });
}

export async function deletePhoto(db: Db, id: string): Promise<void> {
  await db('photos').where({ id }).delete();
}

/** The photos placed on a section's stretch (chainage within it, ends included). */
export async function listPhotosOnSection(db: Db, section: { projectId: string; plannedRouteRef: string | null; fromChainageM: number; toChainageM: number }): Promise<Photo[]> {
  const rows = await joins(recordsOnSection(db, 'photos', section, 'point')).orderBy('rec.chainage_m').select(columns(db));
  return rows.map(toDto);
}
