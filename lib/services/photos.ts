import { randomUUID } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import type { Knex } from 'knex';
import { writeAudit } from '@/db/audit';
import { deletePhoto, findPhotoBySha, getPhoto, getPhotoFiles, insertPhotoOnce, updatePhoto, type Photo, type PhotoPlacement } from '@/db/photos';
import type { Project } from '@/db/projects';
import { getAnchorRoute } from '@/db/record-anchors';
import { getRoadCrossing } from '@/db/road-crossings';
import { AppError } from '@/lib/api/errors';
import type { ReceivedForm } from '@/lib/api/multipart';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { pointAtChainage } from '@/lib/matching/chainage';
import type { PointAnchor, PointAnchorInput } from '@/lib/records/anchor';
import { decodePhoto, PhotoRefusal, readPhotoExif, sniffPhoto, takenAtOf, type PhotoExif } from '@/lib/records/photo-image';
import { PHOTO_MAX_BYTES, photoFieldsSchema, type PhotoFields, type PhotoPatch } from '@/lib/records/photo-schema';
import { originalsStore } from '@/lib/storage/originals-store';
import { removeOriginals, storeOriginals, type StoredOriginal } from './originals';
import { resolvePointAnchor } from './record-anchors';
import { assertContractorWriter } from './road-crossings';

const mb = (n: number) => `${(n / 1024 / 1024).toFixed(n < 1024 * 1024 ? 2 : 0)} MB`;

/** What the audit log keeps of a photo: where it is, what it shows, which file. */
const audited = (p: Photo) => ({
  fileName: p.fileName, caption: p.caption, route: p.routeRef, chainageM: Number(p.chainageM.toFixed(2)), placedBy: p.placedBy,
  crossing: p.crossingRef, pitId: p.pitId, takenAt: p.takenAt, sizeBytes: p.sizeBytes,
});

async function crossingAnchor(db: Knex | Knex.Transaction, project: Project, crossingId: string): Promise<{ id: string; anchor: PointAnchor }> {
  const c = await getRoadCrossing(db, crossingId);
  if (!c || c.projectId !== project.id) throw new AppError('invalid', 'That road crossing is not in this project.', [{ path: 'crossingId', message: 'Pick a road crossing of this project.' }]);
  const route = (await getAnchorRoute(db, project.id, c.routeId))!;
  const mid = (c.fromChainageM + c.toChainageM) / 2;
  return { id: c.id, anchor: { routeId: route.id, chainageM: mid, offsetM: 0, position: pointAtChainage(route.coords, Math.min(mid, route.lengthM)), source: 'chainage' } };
}

async function pitAnchor(db: Knex | Knex.Transaction, project: Project, pitId: string): Promise<{ id: string; anchor: PointAnchor }> {
  const pit = await db('test_pits').where({ id: pitId, project_id: project.id }).first('id', 'route_id', 'chainage_m', 'offset_m', db.raw('ST_X(geom) as lon'), db.raw('ST_Y(geom) as lat'));
  if (!pit) throw new AppError('invalid', 'That test pit is not in this project.', [{ path: 'pitId', message: 'Pick a test pit of this project.' }]);
  return { id: pit.id, anchor: { routeId: pit.route_id, chainageM: pit.chainage_m, offsetM: pit.offset_m, position: [pit.lon, pit.lat], source: 'position' } };
}

/** Re-words a refused snap so the person knows which position was refused; a typed chainage on a removed route is refused. */
async function snap(db: Knex | Knex.Transaction, project: Project, input: PointAnchorInput, what: string): Promise<PointAnchor> {
  if ('chainageM' in input) {
    const route = await getAnchorRoute(db, project.id, input.routeId);
    if (route?.removed) throw new AppError('invalid', `Route ${route.ref} was removed by a plan revision: its photos stay, but no new ones are placed on it.`, [{ path: 'routeId', message: 'This route was removed from the plan.' }]);
  }
  try {
    return await resolvePointAnchor(db, project.id, input);
  } catch (err) {
    if (err instanceof AppError && what) throw new AppError(err.code, `${what}: ${err.message}`, err.details);
    throw err;
  }
}

const NO_POSITION = 'The photo carries no GPS position: give its place (use my position, a tap on the map, or a route and chainage), or attach it to a crossing or a test pit.';

/**
 * Where a new photo goes, in this order: a position given by hand, a typed route and chainage, the photo's
 * own EXIF GPS position (snapped to `routeId` when given), the crossing or pit it is attached to. None of
 * these → 422 position_required.
 */
async function placeNew(db: Knex, project: Project, f: PhotoFields, exif: PhotoExif): Promise<{ anchor: PointAnchor; placedBy: PhotoPlacement; crossingId: string | null; pitId: string | null }> {
  const crossing = f.crossingId ? await crossingAnchor(db, project, f.crossingId) : undefined;
  const pit = f.pitId ? await pitAnchor(db, project, f.pitId) : undefined;
  const attached = { crossingId: crossing?.id ?? null, pitId: pit?.id ?? null };
  if (f.lon !== undefined && f.lat !== undefined) return { anchor: await snap(db, project, { lon: f.lon, lat: f.lat, routeId: f.routeId }, ''), placedBy: 'hand', ...attached };
  if (f.routeId && f.chainageM !== undefined) return { anchor: await snap(db, project, { routeId: f.routeId, chainageM: f.chainageM }, ''), placedBy: 'chainage', ...attached };
  if (exif.lon !== null && exif.lat !== null) {
    const anchor = await snap(db, project, { lon: exif.lon, lat: exif.lat, routeId: f.routeId }, `The photo's own GPS position (${exif.lat.toFixed(6)}, ${exif.lon.toFixed(6)})`);
    return { anchor, placedBy: 'exif', ...attached };
  }
  if (crossing) return { anchor: crossing.anchor, placedBy: 'crossing', ...attached };
  if (pit) return { anchor: pit.anchor, placedBy: 'pit', ...attached };
  throw new AppError('position_required', NO_POSITION, [{ path: 'lon', message: 'Give the photo\'s place: it has no GPS position of its own.' }]);
}

/**
 * Takes one JPEG or PNG from a received multipart form: checks its type by its magic bytes, its size and
 * that it decodes whole, reads its EXIF position and time, places it, keeps the original byte for byte
 * (with its SHA-256) and a thumbnail in the originals store, and writes the row and the audit entry in one
 * transaction. A refused photo leaves nothing behind; the same bytes again give the stored photo (200).
 */
export async function receivePhoto(db: Knex, actor: Principal, project: Project, form: ReceivedForm): Promise<{ photo: Photo; created: boolean }> {
  assertContractorWriter(actor, project);
  const fields = photoFieldsSchema.parse(form.fields);
  const parts = form.files.filter((f) => f.field === 'file' || f.field === 'photo');
  if (parts.length === 0) throw new AppError('bad_request', 'Attach the photo in a multipart part named "file".');
  if (parts.length > 1) throw new AppError('bad_request', `Send one photo a request (${parts.length} were attached).`);
  const part = parts[0];
  if (part.size === 0) throw new AppError('empty_file', `"${part.fileName}" is empty.`);
  if (part.size > PHOTO_MAX_BYTES) throw new AppError('too_large', `"${part.fileName}" is ${mb(part.size)}; a photo may be at most ${mb(PHOTO_MAX_BYTES)}.`);
  const bytes = await readFile(part.tmpPath);
  const mime = sniffPhoto(bytes);
  if (!mime) throw new AppError('unsupported_format', `"${part.fileName}" is not a JPEG or PNG photo (its first bytes say so, whatever its name says): send the photo as the camera saved it.`);

  const existing = await findPhotoBySha(db, project.id, part.sha256);
  if (existing) return { photo: existing, created: false };

  let decoded;
  try {
    decoded = await decodePhoto(bytes, mime);
  } catch (err) {
    if (err instanceof PhotoRefusal) throw new AppError(err.kind === 'too_many_pixels' ? 'too_large' : 'malformed', err.message);
    throw err;
  }
  const exif = await readPhotoExif(bytes);
  const place = await placeNew(db, project, fields, exif);

  const id = randomUUID();
  const prefix = `photos/${project.id}/${id}`;
  const thumbnailKey = `${prefix}/thumbnail.jpg`;
  let stored: StoredOriginal[] = [];
  const removeFiles = () => removeOriginals([...stored, { fileName: 'thumbnail.jpg', storageKey: thumbnailKey, sha256: '', sizeBytes: 0 }]);
  try {
    stored = await storeOriginals(prefix, [part], [bytes]);
    await originalsStore().put(thumbnailKey, decoded.thumbnail);
    const inserted = await db.transaction(async (trx) => {
      const won = await insertPhotoOnce(
        trx,
        {
          id, projectId: project.id, anchor: place.anchor, placedBy: place.placedBy, crossingId: place.crossingId, pitId: place.pitId,
          takenAt: takenAtOf(exif, project.timeZone), caption: fields.caption ?? '', fileName: part.fileName, mimeType: mime,
          sizeBytes: part.size, sha256: part.sha256, width: decoded.width, height: decoded.height, storageKey: stored[0].storageKey, thumbnailKey,
        },
        actor.id,
      );
      if (!won) return false;
      await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'photo', objectId: id, action: 'create', after: audited((await getPhoto(trx, id))!) });
      return true;
    });
    if (!inserted) {
      await removeFiles();
      return { photo: (await findPhotoBySha(db, project.id, part.sha256))!, created: false };
    }
  } catch (err) {
    await removeFiles();
    throw err;
  }
  return { photo: (await getPhoto(db, id))!, created: true };
}

/** Changes a photo's caption, moves it by hand (or to a chainage), attaches it to a crossing or pit or detaches it. */
export async function editPhoto(db: Knex, actor: Principal, project: Project, id: string, patch: PhotoPatch): Promise<Photo> {
  assertContractorWriter(actor, project);
  await db.transaction(async (trx) => {
    await trx('photos').where({ id }).forUpdate().first('id');
    const before = await getPhoto(trx, id);
    if (!before || before.projectId !== project.id) throw new AppError('not_found', 'No such photo in this project.');
    let anchor: PointAnchor = { routeId: before.routeId, chainageM: before.chainageM, offsetM: before.offsetM, position: [before.lon, before.lat], source: 'position' };
    let placedBy = before.placedBy;
    if (patch.lon !== undefined && patch.lat !== undefined) {
      anchor = await resolvePointAnchor(trx, project.id, { lon: patch.lon, lat: patch.lat, routeId: patch.routeId });
      placedBy = 'hand';
    } else if (patch.routeId && patch.chainageM !== undefined) {
      anchor = await snap(trx, project, { routeId: patch.routeId, chainageM: patch.chainageM }, '');
      placedBy = 'chainage';
    }
    const crossingId = patch.crossingId === undefined ? before.crossingId : patch.crossingId === null ? null : (await crossingAnchor(trx, project, patch.crossingId)).id;
    const pitId = patch.pitId === undefined ? before.pitId : patch.pitId === null ? null : (await pitAnchor(trx, project, patch.pitId)).id;
    if (crossingId && pitId) throw new AppError('invalid', 'Attach the photo to a crossing or a test pit, not both.', [{ path: 'pitId', message: 'Attach the photo to a crossing or a test pit, not both.' }]);
    await updatePhoto(trx, id, { caption: patch.caption ?? before.caption, anchor, placedBy, crossingId, pitId }, actor.id);
    const after = (await getPhoto(trx, id))!;
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'photo', objectId: id, action: 'update', before: audited(before), after: audited(after) });
  });
  return (await getPhoto(db, id))!;
}

/** Removes a photo: the row and the audit entry in one transaction, then (once committed) its files. */
export async function removePhoto(db: Knex, actor: Principal, project: Project, id: string): Promise<void> {
  assertContractorWriter(actor, project);
  const files = await db.transaction(async (trx) => {
    const before = await getPhoto(trx, id);
    if (!before || before.projectId !== project.id) throw new AppError('not_found', 'No such photo in this project.');
    const f = (await getPhotoFiles(trx, id))!;
    await deletePhoto(trx, id);
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'photo', objectId: id, action: 'delete', before: audited(before) });
    return f;
  });
  // a failure here leaves files no row names: the orphan sweep takes them
  await Promise.all([originalsStore().remove(files.storageKey), originalsStore().remove(files.thumbnailKey)]).catch(() => undefined);
}
