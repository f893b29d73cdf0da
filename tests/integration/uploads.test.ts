import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getProject, type Project } from '@/db/projects';
import { listUploadFiles, uploadFeatureCollection } from '@/db/uploads';
import { AppError } from '@/lib/api/errors';
import { receiveMultipart } from '@/lib/api/multipart';
import type { Principal } from '@/lib/auth/principal';
import { changeProject, createProject, createProjectSchema } from '@/lib/services/projects';
import { receiveUpload, retryUpload, withdrawUpload } from '@/lib/services/uploads';
import { originalsStore } from '@/lib/storage/originals-store';
import { count, countFiles, makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf, gpxTrack } from '../helpers/upload-form';

process.env.STORAGE_DIR ??= path.resolve(__dirname, '../../.data/test-storage');
const db = getDb();
let surveyor: Principal;
let project: Project;
let other: Project;


async function snapshot() {
  return { uploads: await count(db, 'uploads'), features: await count(db, 'upload_features'), files: await count(db, 'upload_files'), stored: await countFiles(process.env.STORAGE_DIR!) };
}

async function send(files: { name: string; bytes: Buffer | string }[], fields: Record<string, string> = {}, p = project) {
  const form = await formOf(files, fields);
  try {
    return await receiveUpload(db, surveyor, p, form);
  } finally {
    await form.cleanup();
  }
}

beforeAll(async () => {
  const admin = await makePrincipal(db, 'admin', 'contractor');
  surveyor = await makePrincipal(db, 'surveyor', 'contractor', admin.organisationName);
  const partner = await registerPartner(db, admin, `Upload owner ${Date.now()}`);
  project = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: 'Uploads A', partnerOrganisation: partner, defaultAccuracyClass: 'handheld_gnss' }))).id))!;
  other = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: 'Uploads B', partnerOrganisation: partner }))).id))!;
});
afterAll(() => closeDb());

describe('upload pipeline', () => {
  it('stores a GPX track: original byte for byte, geometry in PostGIS, audited', async () => {
    const gpx = gpxTrack(120);
    const before = await snapshot();
    const { upload, created } = await send([{ name: 'crew2-morning.gpx', bytes: gpx }], { surveyDate: '2026-11-03', crew: 'Crew 2' });
    expect(created).toBe(true);
    expect(upload).toMatchObject({ status: 'stored', format: 'gpx', crs: 'EPSG:4326', featureCount: 1, pointCount: 120, accuracyClass: 'handheld_gnss', sigmaM: 4, surveyDate: '2026-11-03', crew: 'Crew 2' });
    expect(await snapshot()).toEqual({ uploads: before.uploads + 1, features: before.features + 1, files: before.files + 1, stored: before.stored + 1 });
    const [file] = await listUploadFiles(db, upload.id);
    const { buffer } = await import('node:stream/consumers');
    expect((await buffer(originalsStore().get(file.storageKey))).toString('utf8')).toBe(gpx);
    const fc = await uploadFeatureCollection(db, upload.id);
    expect(fc.features[0].geometry.type).toBe('LineString');
    expect(fc.features[0].geometry.coordinates[0]).toEqual([9.105, 52.105]);
    const [row] = await db('upload_features').where({ upload_id: upload.id }).select('heights', 'times', 'point_count');
    expect(row.point_count).toBe(120);
    expect(row.heights[0]).toBe(50);
    expect(row.times[1].toISOString()).toBe('2026-11-03T08:00:01.000Z');
    const audit = await db('audit_log').where({ object_id: upload.id });
    expect(audit.map((a) => a.action)).toEqual(['create']);
  });

  it('returns the existing upload for the same bytes in the same project, a new one in another', async () => {
    const gpx = gpxTrack(30, { seed: 7 });
    const first = await send([{ name: 'a.gpx', bytes: gpx }]);
    const before = await snapshot();
    const again = await send([{ name: 'renamed.gpx', bytes: gpx }]);
    expect(again.created).toBe(false);
    expect(again.upload.id).toBe(first.upload.id);
    expect(await snapshot()).toEqual(before);
    const elsewhere = await send([{ name: 'a.gpx', bytes: gpx }], {}, other);
    expect(elsewhere.created).toBe(true);
    expect(elsewhere.upload.id).not.toBe(first.upload.id);
  });

  it('lands 10 different files sent at once exactly once each', async () => {
    const before = await snapshot();
    const results = await Promise.all(Array.from({ length: 10 }, (_, i) => send([{ name: `c${i}.gpx`, bytes: gpxTrack(20, { seed: 100 + i }) }])));
    expect(results.every((r) => r.created)).toBe(true);
    expect(new Set(results.map((r) => r.upload.id)).size).toBe(10);
    expect(await snapshot()).toEqual({ uploads: before.uploads + 10, features: before.features + 10, files: before.files + 10, stored: before.stored + 10 });
  });

  it('gives exactly one upload for 10 identical files sent at once', async () => {
    const gpx = gpxTrack(25, { seed: 999 });
    const before = await snapshot();
    const results = await Promise.all(Array.from({ length: 10 }, () => send([{ name: 'same.gpx', bytes: gpx }])));
    expect(results.filter((r) => r.created)).toHaveLength(1);
    expect(new Set(results.map((r) => r.upload.id)).size).toBe(1);
    expect(await snapshot()).toEqual({ uploads: before.uploads + 1, features: before.features + 1, files: before.files + 1, stored: before.stored + 1 });
  });

  for (const [label, bytes, code] of [
    ['an empty file', '', 'empty_file'],
    ['unknown content', 'hello, this is not geodata\n\u0000\u0001', 'unknown_format'],
    ['a DXF drawing', '  0\r\nSECTION\r\n  2\r\nHEADER\r\n  0\r\nENDSEC\r\n  0\r\nEOF\r\n', 'unsupported_format'],
  ] as const) {
    it(`refuses ${label} with ${code} and leaves nothing behind`, async () => {
      const before = await snapshot();
      const err = await send([{ name: 'x.dat', bytes }]).catch((e) => e);
      expect(err).toBeInstanceOf(AppError);
      expect(err.code).toBe(code);
      expect(await snapshot()).toEqual(before);
    });
  }

  it('keeps a file that fails to parse, with its record and original, and says which upload', async () => {
    const before = await snapshot();
    const broken = gpxTrack(10).slice(0, -40);
    const err = await send([{ name: 'cut-off.gpx', bytes: broken }]).catch((e) => e);
    expect(err).toBeInstanceOf(AppError);
    expect(err.code).toBe('malformed');
    expect(err.details.uploadId).toMatch(/^[0-9a-f-]{36}$/);
    expect(await snapshot()).toEqual({ uploads: before.uploads + 1, features: before.features, files: before.files + 1, stored: before.stored + 1 });
    const row = await db('uploads').where({ id: err.details.uploadId }).first();
    expect(row).toMatchObject({ status: 'failed', error_code: 'malformed' });
  });

  it('retries a failed upload when the same bytes come again with the missing CRS', async () => {
    // a projected survey CSV (EPSG:25832, UTM 32N) without a CRS cannot be read
    const csv = 'pt,easting,northing,height,code\n1,507200.00,5773400.00,51.20,TR\n2,507210.00,5773405.00,51.25,TR\n3,507220.00,5773410.00,51.30,TR\n';
    const err = await send([{ name: 'rover.csv', bytes: csv }]).catch((e) => e);
    expect(err.code).toBe('crs_required');
    const uploadId = err.details.uploadId;
    const before = await snapshot();
    const again = await send([{ name: 'rover.csv', bytes: csv }], { crs: 'EPSG:25832' });
    expect(again.upload.id).toBe(uploadId);
    expect(again.upload.status).toBe('stored');
    expect(again.upload.crs).toBe('EPSG:25832');
    expect(again.upload.pointCount).toBe(3);
    expect((await snapshot()).uploads).toBe(before.uploads);
    const actions = (await db('audit_log').where({ object_id: uploadId }).orderBy('id')).map((a) => a.action);
    expect(actions).toEqual(['create', 'retry']);
  });

  it('retries from the stored original through the retry call', async () => {
    const csv = 'pt,easting,northing,height\nA,507300.0,5773500.0,50.0\nB,507301.0,5773501.0,50.1\n';
    const err = await send([{ name: 'ts.csv', bytes: csv }]).catch((e) => e);
    expect(err.code).toBe('crs_required');
    const { upload } = await retryUpload(db, surveyor, project, err.details.uploadId, { crs: 'EPSG:25832' });
    expect(upload.status).toBe('stored');
  });

  it('withdraws and supersedes, keeping the originals, audited', async () => {
    const first = await send([{ name: 'v1.gpx', bytes: gpxTrack(15, { seed: 4242 }) }]);
    const second = await send([{ name: 'v2.gpx', bytes: gpxTrack(16, { seed: 4242 }) }], { supersedes: first.upload.id });
    const old = await db('uploads').where({ id: first.upload.id }).first();
    expect(old).toMatchObject({ status: 'superseded', superseded_by: second.upload.id });
    const w = await withdrawUpload(db, surveyor, project, second.upload.id, 'walked the wrong street');
    expect(w.status).toBe('withdrawn');
    expect((await listUploadFiles(db, second.upload.id)).length).toBe(1);
    const audit = await db('audit_log').where({ object_id: second.upload.id }).orderBy('id');
    expect(audit.map((a) => a.action)).toEqual(['create', 'withdraw']);
    expect(audit[1].after.reason).toBe('walked the wrong street');
  });
});

describe('accuracy of an upload', () => {
  it('takes σ from the class default, or from the project when it overrides the class', async () => {
    const admin = await makePrincipal(db, 'admin', 'contractor');
    const p = await createProject(db, admin, createProjectSchema.parse({ name: 'Sigma', partnerOrganisation: await registerPartner(db, admin, `Sigma owner ${Date.now()}`) }));
    const rtk = await send([{ name: 'r.gpx', bytes: gpxTrack(5, { seed: 31337 }) }], { accuracy: 'rtk_gnss' }, (await getProject(db, p.id))!);
    expect(rtk.upload.sigmaM).toBe(0.02);
    await changeProject(db, admin, p.id, { accuracySigmas: { handheld_gnss: 2.5 } });
    const hand = await send([{ name: 'h.gpx', bytes: gpxTrack(5, { seed: 31338 }) }], { accuracy: 'handheld_gnss' }, (await getProject(db, p.id))!);
    expect(hand.upload.sigmaM).toBe(2.5);
    expect(createProjectSchema.safeParse({ name: 'x', partnerOrganisation: 'yy', accuracySigmas: { rtk_gnss: -1 } }).success).toBe(false);
  });
});

describe('multipart size limit', () => {
  it('refuses a body over the limit while it streams, before it has all arrived', async () => {
    const boundary = 'xxBOUNDARYxx';
    let pulled = 0;
    const chunk = Buffer.alloc(64 * 1024, 0x41);
    const stream = new ReadableStream<Uint8Array>({
      start(c) {
        c.enqueue(Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="big.gpx"\r\nContent-Type: application/octet-stream\r\n\r\n`));
      },
      pull(c) {
        // an endless body: only a refusal while streaming can end this test
        pulled += chunk.length;
        c.enqueue(chunk);
      },
    });
    const req = new Request('http://127.0.0.1/upload', { method: 'POST', body: stream, headers: { 'content-type': `multipart/form-data; boundary=${boundary}` }, duplex: 'half' } as RequestInit);
    const err = await receiveMultipart(req, 1024 * 1024).catch((e) => e);
    expect(err).toBeInstanceOf(AppError);
    expect(err.code).toBe('too_large');
    expect(pulled).toBeLessThan(4 * 1024 * 1024);
  });

  it('refuses a declared Content-Length over the limit at once', async () => {
    const req = new Request('http://127.0.0.1/upload', { method: 'POST', body: 'x', headers: { 'content-type': 'multipart/form-data; boundary=b', 'content-length': String(500 * 1024 * 1024) } });
    await expect(receiveMultipart(req, 200 * 1024 * 1024)).rejects.toMatchObject({ code: 'too_large' });
  });
});
