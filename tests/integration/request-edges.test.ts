import path from 'node:path';
import { readFile } from 'node:fs/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { NextRequest } from 'next/server';
import { closeDb, getDb } from '@/db/client';
import { getProject, type Project } from '@/db/projects';
import { listUploadFiles } from '@/db/uploads';
import { AppError } from '@/lib/api/errors';
import { receiveMultipart } from '@/lib/api/multipart';
import { readJsonBody } from '@/lib/api/read-body';
import type { Principal } from '@/lib/auth/principal';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { receiveUpload } from '@/lib/services/uploads';
import { originalsStore } from '@/lib/storage/originals-store';
import { count, countFiles, makePrincipal, registerPartner } from '../helpers/fixtures';
import { gpxTrack } from '../helpers/upload-form';
import { GET as getOriginal } from '@/app/api/projects/[projectId]/uploads/[uploadId]/original/route';
import { POST as postToken } from '@/app/api/tokens/route';
import { GET as getSections } from '@/app/api/projects/[projectId]/sections/route';

process.env.STORAGE_DIR ??= path.resolve(__dirname, '../../.data/test-storage');
const db = getDb();
let admin: Principal;
let surveyor: Principal;
let project: Project;
let token: string;

beforeAll(async () => {
  admin = await makePrincipal(db, 'admin', 'contractor');
  surveyor = await makePrincipal(db, 'surveyor', 'contractor', admin.organisationName);
  const partner = await registerPartner(db, admin, `Edge owner ${Date.now()}`);
  project = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: 'Request edges', partnerOrganisation: partner }))).id))!;
  const { createToken } = await import('@/lib/services/tokens');
  token = (await createToken(db, surveyor, { name: 'edges' })).secret;
});
afterAll(() => closeDb());

/** A multipart body made by hand: the file name's bytes are UTF-8, as browsers and curl send them. */
function multipart(fileName: string, bytes: string, fields: Record<string, string> = {}) {
  const boundary = 'tbEdge7MA4YWxkTrZu0gW';
  const parts = Object.entries(fields).map(([k, v]) => `--${boundary}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`);
  const body = Buffer.concat([
    Buffer.from(parts.join(''), 'utf8'),
    Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${fileName}"\r\nContent-Type: application/octet-stream\r\n\r\n`, 'utf8'),
    Buffer.from(bytes, 'utf8'),
    Buffer.from(`\r\n--${boundary}--\r\n`, 'utf8'),
  ]);
  return new Request('http://127.0.0.1/upload', { method: 'POST', body, headers: { 'content-type': `multipart/form-data; boundary=${boundary}` } });
}

const jsonRequest = (body: BodyInit, headers: Record<string, string> = { 'content-type': 'application/json' }) =>
  new Request('http://127.0.0.1/x', { method: 'POST', body, headers, duplex: 'half' } as RequestInit);

describe('multipart bodies', () => {
  it('refuses multipart/form-data without a boundary with a 400 that says what is missing', async () => {
    const req = new Request('http://127.0.0.1/upload', { method: 'POST', body: 'x', headers: { 'content-type': 'multipart/form-data' } });
    const err = await receiveMultipart(req, 1024 * 1024).catch((e) => e);
    expect(err).toBeInstanceOf(AppError);
    expect(err.status).toBe(400);
    expect(err.message).toMatch(/boundary/i);
  });

  it('refuses a NUL character in a text field with a 422 naming the field', async () => {
    const err = await receiveMultipart(multipart('a.gpx', gpxTrack(3), { crew: 'Crew\u0000A' }), 1024 * 1024).catch((e) => e);
    expect(err).toBeInstanceOf(AppError);
    expect(err.status).toBe(422);
    expect(err.message).toContain('crew');
    expect(err.message).toContain('U+0000');
  });

  // names in three scripts and an emoji outside the Basic Multilingual Plane
  it.each(['Straße 12.gpx', 'רחוב הגפן.gpx', 'trace 🚧🛰️.gpx'])('keeps the UTF-8 file name %s as sent, in the row and in the download header', async (name) => {
    const form = await receiveMultipart(multipart(name, gpxTrack(5, { seed: [...name].reduce((n, c) => n + c.codePointAt(0)!, 0) })), 1024 * 1024);
    expect(form.files[0].fileName).toBe(name);
    let uploadId: string;
    try {
      uploadId = (await receiveUpload(db, surveyor, project, form)).upload.id;
    } finally {
      await form.cleanup();
    }
    const [stored] = await listUploadFiles(db, uploadId);
    expect(stored.fileName).toBe(name);
    const row = await db('uploads').where({ id: uploadId }).first('file_name');
    expect(row.file_name).toBe(name);

    const res = await getOriginal(
      new NextRequest(`http://127.0.0.1/api/projects/${project.id}/uploads/${uploadId}/original`, { headers: { authorization: `Bearer ${token}` } }),
      { params: Promise.resolve({ projectId: project.id, uploadId }) },
    );
    expect(res.status).toBe(200);
    // RFC 6266 / RFC 8187: a name outside ISO-8859-1 travels percent-encoded as UTF-8 in filename*;
    // one inside it (Straße) may travel as the plain quoted filename
    const header = res.headers.get('content-disposition')!;
    const extended = /filename\*=UTF-8''([^;]+)/i.exec(header);
    expect(extended ? decodeURIComponent(extended[1]) : /filename="([^"]*)"/.exec(header)![1]).toBe(name);
    if (/[^\u0000-\u00ff]/.test(name)) expect(extended).not.toBeNull();
    expect(Buffer.from(await res.arrayBuffer()).equals(await readFile(path.join(process.env.STORAGE_DIR!, stored.storageKey)))).toBe(true);
    expect(originalsStore()).toBeTruthy();
  });
});

describe('JSON bodies', () => {
  it('requires application/json (415), accepting the +json suffix and a charset', async () => {
    await expect(readJsonBody(jsonRequest('{}', { 'content-type': 'text/plain' }), 1024)).rejects.toMatchObject({ code: 'unsupported_format', status: 415 });
    await expect(readJsonBody(jsonRequest('{}', {}), 1024)).rejects.toMatchObject({ status: 415 });
    expect(await readJsonBody(jsonRequest('{"a":1}', { 'content-type': 'application/merge-patch+json; charset=utf-8' }), 1024)).toEqual({ a: 1 });
  });

  it('refuses a declared length over the limit before reading, and an undeclared one as soon as it passes the limit', async () => {
    const declared = jsonRequest('{}', { 'content-type': 'application/json', 'content-length': String(600 * 1024 * 1024) });
    await expect(readJsonBody(declared, 1024 * 1024)).rejects.toMatchObject({ code: 'too_large', status: 413 });

    let pulled = 0;
    const chunk = new TextEncoder().encode(`"${'x'.repeat(64 * 1024)}",`);
    const endless = new ReadableStream<Uint8Array>({
      pull(c) {
        pulled += chunk.length;
        c.enqueue(pulled === chunk.length ? new TextEncoder().encode('[') : chunk);
      },
    });
    const err = await readJsonBody(jsonRequest(endless), 1024 * 1024).catch((e) => e);
    expect(err).toMatchObject({ code: 'too_large', status: 413 });
    expect(pulled).toBeLessThan(2 * 1024 * 1024);
  });

  it('refuses NUL characters in any string or key with the path of the first one', async () => {
    const err = await readJsonBody(jsonRequest('{"reason":"ok","items":[{"note":"a\\u0000b"}]}'), 1024).catch((e: Error) => e) as Error;
    expect(err).toMatchObject({ code: 'invalid', status: 422 });
    expect(err.message).toContain('items.0.note');
    await expect(readJsonBody(jsonRequest('{"a\\u0000":1}'), 1024)).rejects.toMatchObject({ status: 422 });
    await expect(readJsonBody(jsonRequest('{"a":'), 1024)).rejects.toMatchObject({ code: 'bad_json', status: 400 });
  });

  it('answers through the route wrapper: 413 and 415 without storing anything, NUL in a query as 422 not 500', async () => {
    const before = await count(db, 'api_tokens');
    const url = 'http://127.0.0.1/api/tokens';
    const noParams = { params: Promise.resolve({}) };
    const auth = { authorization: `Bearer ${token}` };
    const big = await postToken(new NextRequest(url, { method: 'POST', headers: { ...auth, 'content-type': 'application/json', 'content-length': String(5 * 1024 * 1024) }, body: '{"name":"x"}' }), noParams);
    expect(big.status).toBe(413);
    expect((await big.json()).error.code).toBe('too_large');
    const typed = await postToken(new NextRequest(url, { method: 'POST', headers: { ...auth, 'content-type': 'text/plain' }, body: '{"name":"x"}' }), noParams);
    expect(typed.status).toBe(415);
    const nulBody = await postToken(new NextRequest(url, { method: 'POST', headers: { ...auth, 'content-type': 'application/json' }, body: '{"name":"a\\u0000b"}' }), noParams);
    expect(nulBody.status).toBe(422);
    expect(await count(db, 'api_tokens')).toBe(before);
    const good = await postToken(new NextRequest(url, { method: 'POST', headers: { ...auth, 'content-type': 'application/json' }, body: '{"name":"fine"}' }), noParams);
    expect(good.status).toBe(201);
    expect(await count(db, 'api_tokens')).toBe(before + 1);

    const params = { params: Promise.resolve({ projectId: project.id }) };
    const nul = await getSections(new NextRequest(`http://127.0.0.1/api/projects/${project.id}/sections?format=%00`, { headers: auth }), params);
    expect(nul.status).toBe(422);
    expect((await nul.json()).error.message).toContain('U+0000');
  });
});

describe('stored folders', () => {
  it('leaves no empty folder when an upload is refused after its originals were written', async () => {
    const { storeOriginals, removeOriginals } = await import('@/lib/services/originals');
    const before = await countFiles(process.env.STORAGE_DIR!);
    const prefix = `uploads/${project.id}/refused-${Date.now()}`;
    const tmp = path.join(process.env.STORAGE_DIR!, '..', `edge-${Date.now()}`);
    await import('node:fs/promises').then((fs) => fs.writeFile(tmp, 'abc'));
    const stored = await storeOriginals(prefix, [{ field: 'file', fileName: 'a.gpx', tmpPath: tmp, size: 3, sha256: 'x' }], [Buffer.from('abc')]);
    await removeOriginals(stored);
    await expect(import('node:fs/promises').then((fs) => fs.stat(path.join(process.env.STORAGE_DIR!, prefix)))).rejects.toMatchObject({ code: 'ENOENT' });
    expect(await countFiles(process.env.STORAGE_DIR!)).toBe(before);
  });
});
