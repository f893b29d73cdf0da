import { createHash } from 'node:crypto';
import { buffer as readAll } from 'node:stream/consumers';
import { mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import piexif from 'piexifjs';
import sharp from 'sharp';
import { NextRequest } from 'next/server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getPhotoFiles, listPhotos, listPhotosOnSection, type Photo } from '@/db/photos';
import { getRoadCrossing } from '@/db/road-crossings';
import { committedOriginalKeys } from '@/db/stored-files';
import { AppError } from '@/lib/api/errors';
import { byProjectRecord } from '@/lib/api/scopes';
import { readPhotoExif, sniffPhoto } from '@/lib/records/photo-image';
import { PHOTO_MAX_BYTES, photoPatchSchema } from '@/lib/records/photo-schema';
import { roadCrossingSchema } from '@/lib/records/road-crossing-schema';
import { importPlan } from '@/lib/services/planned';
import { editPhoto, receivePhoto, removePhoto } from '@/lib/services/photos';
import { createRoadCrossing } from '@/lib/services/road-crossings';
import { createToken } from '@/lib/services/tokens';
import { sweepOrphanFiles } from '@/lib/services/orphans';
import { LocalStore } from '@/lib/storage';
import { originalsStore } from '@/lib/storage/originals-store';
import { describeAudit } from '@/components/audit-words';
import { GET as listRoute, POST as uploadRoute } from '@/app/api/projects/[projectId]/photos/route';
import { GET as originalRoute } from '@/app/api/projects/[projectId]/photos/[photoId]/original/route';
import { GET as thumbnailRoute } from '@/app/api/projects/[projectId]/photos/[photoId]/thumbnail/route';
import { DELETE as deleteRoute, PATCH as patchRoute } from '@/app/api/projects/[projectId]/photos/[photoId]/route';
import { count, countFiles } from '../helpers/fixtures';
import { makeRecordPlan, type RecordPlan } from '../helpers/record-plan';
import { formOf } from '../helpers/upload-form';

const STORAGE = path.resolve(__dirname, '../../.data/test-storage-photos');
process.env.STORAGE_DIR = STORAGE;
const db = getDb();
let plan: RecordPlan;
let foreign: RecordPlan;
let foreignPhoto: Photo;
let seq = 0;

/** A plain JPEG made by sharp, a new colour each call (so new bytes, so a new photo). */
async function plainJpeg(): Promise<Buffer> {
  seq += 1;
  return sharp({ create: { width: 640, height: 480, channels: 3, background: { r: (seq * 37) % 256, g: (seq * 91) % 256, b: (seq * 53) % 256 } } }).jpeg({ quality: 80 }).toBuffer();
}

/** Degrees as the EXIF GPS IFD writes them: three rationals, degrees/1, minutes/1, seconds/10^6. */
function dms(deg: number): [number, number][] {
  const a = Math.abs(deg);
  const d = Math.floor(a);
  const m = Math.floor((a - d) * 60);
  const s = ((a - d) * 60 - m) * 60;
  return [[d, 1], [m, 1], [Math.round(s * 1e6), 1e6]];
}

/**
 * A JPEG whose GPS position and time taken are written by a general-purpose EXIF writer (piexifjs) into the
 * EXIF 2.3 GPS IFD: GPSLatitudeRef/GPSLatitude, GPSLongitudeRef/GPSLongitude, and DateTimeOriginal.
 */
async function jpegWithGps(lat: number, lon: number, taken?: string): Promise<Buffer> {
  const gps = {
    [piexif.GPSIFD.GPSVersionID]: [2, 3, 0, 0],
    [piexif.GPSIFD.GPSLatitudeRef]: lat >= 0 ? 'N' : 'S',
    [piexif.GPSIFD.GPSLatitude]: dms(lat),
    [piexif.GPSIFD.GPSLongitudeRef]: lon >= 0 ? 'E' : 'W',
    [piexif.GPSIFD.GPSLongitude]: dms(lon),
  };
  const exif = taken ? { [piexif.ExifIFD.DateTimeOriginal]: taken } : {};
  const bytes = piexif.dump({ '0th': { [piexif.ImageIFD.Make]: 'Trenchbook test' }, Exif: exif, GPS: gps });
  return Buffer.from(piexif.insert(bytes, (await plainJpeg()).toString('binary')), 'binary');
}

async function upload(who: RecordPlan['surveyor'], p: RecordPlan, name: string, bytes: Buffer, fields: Record<string, string> = {}) {
  const form = await formOf([{ name, bytes }], fields);
  try {
    return await receivePhoto(db, who, p.project, form);
  } finally {
    await form.cleanup();
  }
}

async function refusal(p: Promise<unknown>): Promise<AppError> {
  const err = await p.then(() => null, (e: unknown) => e);
  expect(err).toBeInstanceOf(AppError);
  return err as AppError;
}

const stored = async () => [await count(db, 'photos'), await count(db, 'audit_log'), await countFiles(path.join(STORAGE, 'photos'))];

beforeAll(async () => {
  // the database is new each run; files of an earlier run would be orphans here
  await rm(STORAGE, { recursive: true, force: true });
  plan = await makeRecordPlan(db, 'Photos', [9.25, 52.25]);
  foreign = await makeRecordPlan(db, 'Photos elsewhere', [9.35, 52.35]);
  const [lon, lat] = foreign.at(20, 0);
  foreignPhoto = (await upload(foreign.surveyor, foreign, 'elsewhere.png', await sharp({ create: { width: 50, height: 50, channels: 3, background: '#888' } }).png().toBuffer(), { lon: String(lon), lat: String(lat) })).photo;
});
afterAll(() => closeDb());

describe('photo placement', () => {
  it('places a JPEG at the GPS position an EXIF writer put in it, and keeps the original byte for byte', async () => {
    // 1.5 m north of S-1 at 57 m: left of the route's direction (east), so a positive offset
    const [lon, lat] = plan.at(57, 1.5);
    const bytes = await jpegWithGps(lat, lon, '2026:11:04 10:15:30');
    const { photo, created } = await upload(plan.surveyor, plan, 'IMG_0042.jpg', bytes, { caption: 'Slot at no. 12' });
    expect(created).toBe(true);
    expect(photo).toMatchObject({ placedBy: 'exif', routeRef: 'S-1', mimeType: 'image/jpeg', fileName: 'IMG_0042.jpg', caption: 'Slot at no. 12', width: 640, height: 480, sizeBytes: bytes.length });
    // [reference: EXIF 2.3 GPS IFD as written by piexifjs] the stored position is what was written
    const row = await db('photos').where({ id: photo.id }).first(db.raw('ST_X(geom) as lon'), db.raw('ST_Y(geom) as lat'));
    expect(Math.abs(row.lon - lon)).toBeLessThan(1e-6);
    expect(Math.abs(row.lat - lat)).toBeLessThan(1e-6);
    expect(photo.chainageM).toBeCloseTo(57, 1);
    expect(photo.offsetM).toBeCloseTo(1.5, 1);
    // DateTimeOriginal has no zone: read on the project's clock (Berlin, CET in November: UTC+1)
    expect(photo.takenAt).toBe('2026-11-04T09:15:30.000Z');
    expect(photo.sha256).toBe(createHash('sha256').update(bytes).digest('hex'));

    const files = (await getPhotoFiles(db, photo.id))!;
    const kept = await readAll(originalsStore().get(files.storageKey));
    expect(kept.equals(bytes)).toBe(true);
    const thumb = await sharp(await readAll(originalsStore().get(files.thumbnailKey))).metadata();
    expect([thumb.format, thumb.width, thumb.height]).toEqual(['jpeg', 320, 240]);
    // the orphan sweep knows both files belong to a committed row
    expect(await committedOriginalKeys(db, [files.storageKey, files.thumbnailKey, 'photos/none/x.jpg'])).toEqual(new Set([files.storageKey, files.thumbnailKey]));

    const entry = await db('audit_log').where({ object_type: 'photo', object_id: photo.id }).first();
    expect(describeAudit({ objectType: 'photo', action: entry.action, before: entry.before, after: entry.after })).toBe('Added the photo IMG_0042.jpg on S-1 at 57 m, placed from its own GPS position. Caption: Slot at no. 12.');
  });

  it('reads south and west references as negative degrees', async () => {
    const exif = await readPhotoExif(await jpegWithGps(-33.8567844, -70.6482675));
    expect(Math.abs(exif.lat! - -33.8567844)).toBeLessThan(1e-6);
    expect(Math.abs(exif.lon! - -70.6482675)).toBeLessThan(1e-6);
  });

  it('places a PNG without EXIF by hand (a position), or at a route and chainage', async () => {
    const png = await sharp({ create: { width: 400, height: 300, channels: 4, background: { r: 200, g: 120, b: 40, alpha: 1 } } }).png().toBuffer();
    expect(await readPhotoExif(png)).toEqual({ lon: null, lat: null, takenWall: null, takenOffset: null });
    const [lon, lat] = plan.at(120, -2);
    const { photo } = await upload(plan.surveyor, plan, 'kerb.png', png, { lon: String(lon), lat: String(lat), caption: 'Kerb before sawing' });
    expect(photo).toMatchObject({ placedBy: 'hand', routeRef: 'S-1', mimeType: 'image/png', takenAt: null });
    expect(photo.chainageM).toBeCloseTo(120, 1);
    expect(photo.offsetM).toBeCloseTo(-2, 1);
    expect(Math.abs(photo.lon - lon)).toBeLessThan(1e-9);

    const png2 = await sharp({ create: { width: 40, height: 30, channels: 3, background: '#123456' } }).png().toBuffer();
    const typed = (await upload(plan.engineer, plan, 'typed.png', png2, { routeId: plan.routes.get('S-1')!, chainageM: '75.5' })).photo;
    expect(typed).toMatchObject({ placedBy: 'chainage', chainageM: 75.5, offsetM: 0 });
  });

  it('places a photo without GPS at the road crossing it shows, and counts it on the crossing', async () => {
    const crossing = await createRoadCrossing(db, plan.surveyor, plan.project, roadCrossingSchema.parse({ routeId: plan.routes.get('X-1'), built: true }));
    const { photo } = await upload(plan.surveyor, plan, 'crossing.jpg', await plainJpeg(), { crossingId: crossing.id });
    expect(photo).toMatchObject({ placedBy: 'crossing', crossingId: crossing.id, crossingRef: 'X-1', routeRef: 'X-1' });
    expect(photo.chainageM).toBeCloseTo(4.5, 3);
    expect((await getRoadCrossing(db, crossing.id))!.photoCount).toBe(1);
    expect((await listPhotos(db, plan.project.id, { crossingId: crossing.id })).map((p) => p.id)).toEqual([photo.id]);
  });

  it('places a photo without GPS at the test pit it shows', async () => {
    const [lon, lat] = plan.at(160, 0.5);
    const [pit] = await db('test_pits')
      .insert({ project_id: plan.project.id, route_id: plan.routes.get('S-1'), chainage_m: 160, offset_m: 0.5, geom: db.raw('ST_SetSRID(ST_MakePoint(?, ?), 4326)', [lon, lat]) })
      .returning('id');
    const { photo } = await upload(plan.surveyor, plan, 'pit.jpg', await plainJpeg(), { pitId: pit.id });
    expect(photo).toMatchObject({ placedBy: 'pit', pitId: pit.id, chainageM: 160, offsetM: 0.5 });
    const missing = await refusal(upload(plan.surveyor, plan, 'pit2.jpg', await plainJpeg(), { pitId: foreignPhoto.id }));
    expect(missing.details).toEqual([{ path: 'pitId', message: 'Pick a test pit of this project.' }]);
  });

  it('gives the stored photo for the same bytes again, storing nothing more', async () => {
    const bytes = await plainJpeg();
    const [lon, lat] = plan.at(30, 0);
    const first = await upload(plan.surveyor, plan, 'twice.jpg', bytes, { lon: String(lon), lat: String(lat) });
    const before = await stored();
    const again = await upload(plan.surveyor, plan, 'twice-again.jpg', bytes, { lon: String(lon), lat: String(lat) });
    expect([again.created, again.photo.id]).toEqual([false, first.photo.id]);
    expect(await stored()).toEqual(before);
  });
});

describe('refused photos', () => {
  it('says exactly what is wrong, and stores nothing: not an image, damaged, too large, no position, too far, bad fields', async () => {
    const before = await stored();
    const [lon, lat] = plan.at(50, 0);
    const hand = { lon: String(lon), lat: String(lat) };

    const text = await refusal(upload(plan.surveyor, plan, 'holiday.jpg', Buffer.from('This is a note, not a photo.\n'), hand));
    expect([text.code, text.status, text.message]).toEqual(['unsupported_format', 415, '"holiday.jpg" is not a JPEG or PNG photo (its first bytes say so, whatever its name says): send the photo as the camera saved it.']);
    // a PNG named .jpg is taken as the PNG it is
    expect(sniffPhoto(await sharp({ create: { width: 2, height: 2, channels: 3, background: '#000' } }).png().toBuffer())).toBe('image/png');

    const whole = await plainJpeg();
    const cut = await refusal(upload(plan.surveyor, plan, 'cut.jpg', whole.subarray(0, Math.floor(whole.length / 2)), hand));
    expect([cut.code, cut.status]).toEqual(['malformed', 422]);
    expect(cut.message).toMatch(/^The JPEG (cannot be read|is damaged or cut short)/);

    const huge = Buffer.alloc(PHOTO_MAX_BYTES + 1, 0);
    huge.set([0xff, 0xd8, 0xff, 0xe0]);
    const big = await refusal(upload(plan.surveyor, plan, 'huge.jpg', huge, hand));
    expect([big.code, big.status, big.message]).toEqual(['too_large', 413, '"huge.jpg" is 25 MB; a photo may be at most 25 MB.']);

    const nowhere = await refusal(upload(plan.surveyor, plan, 'nowhere.jpg', await plainJpeg()));
    expect([nowhere.code, nowhere.status]).toEqual(['position_required', 422]);
    expect(nowhere.message).toBe('The photo carries no GPS position: give its place (use my position, a tap on the map, or a route and chainage), or attach it to a crossing or a test pit.');

    // a camera that kept the fix of another town
    const far = await refusal(upload(plan.surveyor, plan, 'far.jpg', await jpegWithGps(52.3, 9.25)));
    expect(far.message).toMatch(/^The photo's own GPS position \(52\.300000, 9\.250000\): That position is \d+ m from the nearest route, more than 100 m/);

    const half = await upload(plan.surveyor, plan, 'half.jpg', await plainJpeg(), { lon: hand.lon }).catch((e) => e);
    expect(half.issues.map((i: { path: string[]; message: string }) => [i.path.join('.'), i.message])).toEqual([['lat', 'Give both longitude and latitude, or neither.']]);
    const words = await upload(plan.surveyor, plan, 'words.jpg', await plainJpeg(), { lon: 'east', lat: hand.lat }).catch((e) => e);
    expect(words.issues[0].message).toBe('Longitude must be a number of degrees.');
    const both = await upload(plan.surveyor, plan, 'both.jpg', await plainJpeg(), { ...hand, crossingId: foreignPhoto.id, pitId: foreignPhoto.id }).catch((e) => e);
    expect(both.issues[0].message).toBe('Attach the photo to a crossing or a test pit, not both.');
    const crossing = await refusal(upload(plan.surveyor, plan, 'x.jpg', await plainJpeg(), { crossingId: foreignPhoto.id }));
    expect(crossing.details).toEqual([{ path: 'crossingId', message: 'Pick a road crossing of this project.' }]);

    // nothing half-stored: rows, audit entries and files as before
    expect(await stored()).toEqual(before);
  });
});

describe('editing, removing, roles and isolation', () => {
  it('changes the caption and moves a photo by hand; the audit entry tells the move', async () => {
    const { photo } = await upload(plan.surveyor, plan, 'move.jpg', await plainJpeg(), { routeId: plan.routes.get('S-1')!, chainageM: '10' });
    const [lon, lat] = plan.at(12, 1);
    const moved = await editPhoto(db, plan.engineer, plan.project, photo.id, photoPatchSchema.parse({ caption: 'Warning tape visible', lon, lat }));
    expect(moved).toMatchObject({ caption: 'Warning tape visible', placedBy: 'hand' });
    expect(moved.chainageM).toBeCloseTo(12, 1);
    const entry = await db('audit_log').where({ object_type: 'photo', object_id: photo.id, action: 'update' }).first();
    expect(describeAudit({ objectType: 'photo', action: 'update', before: entry.before, after: entry.after })).toMatch(/^Changed the photo move\.jpg: the caption from nothing to Warning tape visible; the place from S-1 at 10 m to S-1 at 12(\.\d+)? m\.$/);
    const bad = await refusal(editPhoto(db, plan.engineer, plan.project, photo.id, photoPatchSchema.parse({ routeId: plan.routes.get('S-1'), chainageM: 900 })));
    expect(bad.details).toEqual([{ path: 'chainageM', message: 'At most 200.0 m on route S-1.' }]);
    expect(photoPatchSchema.safeParse({ caption: 'x'.repeat(501) }).error!.issues[0].message).toBe('Keep the caption under 500 characters.');
    expect(photoPatchSchema.safeParse({ routeId: plan.routes.get('S-1') }).error!.issues[0].message).toBe('Give the chainage on the route, or a position.');
    expect(photoPatchSchema.safeParse({ lat: 52.25 }).error!.issues[0].message).toBe('Give both longitude and latitude, or neither.');
  });

  it('removes a photo: row and audit entry together, then its files', async () => {
    const { photo } = await upload(plan.surveyor, plan, 'gone.jpg', await plainJpeg(), { routeId: plan.routes.get('S-1')!, chainageM: '20' });
    const files = (await getPhotoFiles(db, photo.id))!;
    expect(await originalsStore().size(files.storageKey)).toBeGreaterThan(0);
    await removePhoto(db, plan.surveyor, plan.project, photo.id);
    expect(await db('photos').where({ id: photo.id }).first()).toBeUndefined();
    expect([await originalsStore().size(files.storageKey), await originalsStore().size(files.thumbnailKey)]).toEqual([undefined, undefined]);
    const entry = await db('audit_log').where({ object_type: 'photo', object_id: photo.id, action: 'delete' }).first();
    expect(describeAudit({ objectType: 'photo', action: 'delete', before: entry.before, after: entry.after })).toBe('Removed the photo gone.jpg (S-1 at 20 m).');
  });

  it('lets the contractor\'s people add photos; the owner\'s people and maintenance are refused and nothing is stored', async () => {
    const before = await stored();
    for (const who of [plan.owner, plan.maintenance]) {
      const err = await refusal(upload(who, plan, 'owner.jpg', await plainJpeg(), { routeId: plan.routes.get('S-1')!, chainageM: '5' }));
      expect(err.status).toBe(403);
    }
    expect(await stored()).toEqual(before);
    const any = (await listPhotos(db, plan.project.id))[0];
    expect((await refusal(editPhoto(db, plan.owner, plan.project, any.id, { caption: 'x' }))).status).toBe(403);
    expect((await refusal(removePhoto(db, plan.maintenance, plan.project, any.id))).status).toBe(403);
  });

  it('keeps projects apart: another project\'s photo is not found, and is not listed', async () => {
    expect((await refusal(editPhoto(db, plan.surveyor, plan.project, foreignPhoto.id, { caption: 'x' }))).code).toBe('not_found');
    expect((await refusal(removePhoto(db, plan.surveyor, plan.project, foreignPhoto.id))).code).toBe('not_found');
    expect(await byProjectRecord('photos', 'photoId')({ projectId: plan.project.id, photoId: foreignPhoto.id }, db)).toBeUndefined();
    expect((await listPhotos(db, plan.project.id)).some((p) => p.id === foreignPhoto.id)).toBe(false);
  });

  it('keeps every committed photo\'s files in the orphan sweep, and takes a file no row names', async () => {
    const orphan = `photos/${plan.project.id}/00000000-0000-4000-8000-000000000000/0-killed.jpg`;
    await originalsStore().put(orphan, await plainJpeg());
    const filesBefore = await countFiles(path.join(STORAGE, 'photos'));
    const empty = await mkdtemp(path.join(os.tmpdir(), 'tb-photos-sweep-'));
    const report = await sweepOrphanFiles(db, { originals: originalsStore(), exports: new LocalStore(empty), uploadTmpRoot: empty, minAgeSeconds: 60, now: new Date(Date.now() + 3_600_000) });
    expect(report.originals).toEqual([orphan]);
    expect(await countFiles(path.join(STORAGE, 'photos'))).toBe(filesBefore - 1);
    const rows = await db('photos').select('storage_key', 'thumbnail_key');
    for (const r of rows) expect([await originalsStore().size(r.storage_key), await originalsStore().size(r.thumbnail_key)].every((n) => n !== undefined && n > 0)).toBe(true);
  });

  it('shows the photos on a section\'s stretch', async () => {
    const onSection = await listPhotosOnSection(db, { projectId: plan.project.id, plannedRouteRef: 'S-1', fromChainageM: 50, toChainageM: 125 });
    expect(onSection.map((p) => p.fileName)).toEqual(['IMG_0042.jpg', 'typed.png', 'kerb.png']);
  });
});

describe('the photo routes', () => {
  it('take a phone\'s multipart upload and serve the original and the thumbnail; 403 for the owner, 404 across projects', async () => {
    const pid = plan.project.id;
    const surveyorToken = (await createToken(db, plan.surveyor, { name: 'photos' })).secret;
    const ownerToken = (await createToken(db, plan.owner, { name: 'photos' })).secret;
    const req = (method: string, url: string, token: string, body?: BodyInit, type?: string) =>
      new NextRequest(`http://127.0.0.1${url}`, { method, headers: { authorization: `Bearer ${token}`, ...(type ? { 'content-type': type } : {}) }, body });
    const params = (p: Record<string, string>) => ({ params: Promise.resolve(p) });
    const [lon, lat] = plan.at(140, 1);
    const bytes = await jpegWithGps(lat, lon, '2026:11:05 14:02:11');
    const form = () => {
      const f = new FormData();
      f.set('caption', 'Crossing sawn, ducts in');
      f.set('file', new Blob([new Uint8Array(bytes)], { type: 'image/jpeg' }), 'PXL_20261105.jpg');
      return f;
    };
    const base = `/api/projects/${pid}/photos`;
    expect((await uploadRoute(req('POST', base, ownerToken, form()), params({ projectId: pid }))).status).toBe(403);
    const res = await uploadRoute(req('POST', base, surveyorToken, form()), params({ projectId: pid }));
    expect(res.status).toBe(201);
    const { photo } = (await res.json()) as { photo: Photo };
    expect(photo).toMatchObject({ placedBy: 'exif', routeRef: 'S-1', caption: 'Crossing sawn, ducts in', originalUrl: `${base}/${photo.id}/original` });

    const original = await originalRoute(req('GET', `${base}/${photo.id}/original`, ownerToken), params({ projectId: pid, photoId: photo.id }));
    expect([original.status, original.headers.get('content-type'), original.headers.get('x-content-sha256')]).toEqual([200, 'image/jpeg', photo.sha256]);
    expect(Buffer.from(await original.arrayBuffer()).equals(bytes)).toBe(true);
    const thumb = await thumbnailRoute(req('GET', `${base}/${photo.id}/thumbnail`, ownerToken), params({ projectId: pid, photoId: photo.id }));
    expect([thumb.status, thumb.headers.get('content-type')]).toEqual([200, 'image/jpeg']);
    expect((await sharp(Buffer.from(await thumb.arrayBuffer())).metadata()).width).toBe(320);

    const list = await listRoute(req('GET', base, ownerToken), params({ projectId: pid }));
    expect(((await list.json()) as { photos: Photo[] }).photos.some((p) => p.id === photo.id)).toBe(true);
    const foreignUrl = `${base}/${foreignPhoto.id}/original`;
    expect((await originalRoute(req('GET', foreignUrl, surveyorToken), params({ projectId: pid, photoId: foreignPhoto.id }))).status).toBe(404);
    const patched = await patchRoute(req('PATCH', `${base}/${photo.id}`, surveyorToken, JSON.stringify({ caption: 'Crossing sawn' }), 'application/json'), params({ projectId: pid, photoId: photo.id }));
    expect(patched.status).toBe(200);
    expect((await deleteRoute(req('DELETE', `${base}/${photo.id}`, ownerToken), params({ projectId: pid, photoId: photo.id }))).status).toBe(403);
    expect((await deleteRoute(req('DELETE', `${base}/${photo.id}`, surveyorToken), params({ projectId: pid, photoId: photo.id }))).status).toBe(200);
  });
});

describe('a plan revision', () => {
  it('keeps the photos of a removed route, flagged, and places no new one on it', async () => {
    const { photo } = await upload(plan.surveyor, plan, 'x3.jpg', await plainJpeg(), { routeId: plan.routes.get('X-3')!, chainageM: '4' });
    const f = (ref: string, type: string, pts: [number, number][]) => ({ type: 'Feature', properties: { route_id: ref, street: 'Test Street', bundle: '1x14mm', type }, geometry: { type: 'LineString', coordinates: pts.map(([e, n]) => plan.at(e, n)) } });
    const form = await formOf([{ name: 'design-rev2.geojson', bytes: JSON.stringify({ type: 'FeatureCollection', features: [f('S-1', 'street', [[0, 0], [200, 0]]), f('X-1', 'road crossing', [[40, 0], [40, -9]]), f('X-2', 'road crossing', [[90, 0], [90, -9]])] }) }]);
    await importPlan(db, plan.engineer, plan.project, form).finally(() => form.cleanup());
    expect((await listPhotos(db, plan.project.id)).find((p) => p.id === photo.id)).toMatchObject({ routeRef: 'X-3', routeRemoved: true });
    const refused = await refusal(upload(plan.surveyor, plan, 'x3-again.jpg', await plainJpeg(), { routeId: plan.routes.get('X-3')!, chainageM: '5' }));
    expect(refused.message).toBe('Route X-3 was removed by a plan revision: its photos stay, but no new ones are placed on it.');
  });
});
