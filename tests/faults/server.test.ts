import { request as httpRequest } from 'node:http';
import { readdir } from 'node:fs/promises';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getProject, type Project } from '@/db/projects';
import type { Principal } from '@/lib/auth/principal';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { createToken } from '@/lib/services/tokens';
import { count, countFiles, makePrincipal, registerPartner } from '../helpers/fixtures';
import { gpxTrack } from '../helpers/upload-form';
import { sleep, startServer, startWorker, waitFor, type Proc } from './processes';

const PORT = 3191;
const db = getDb();
let admin: Principal;
let project: Project;
let token: string;
const started: Proc[] = [];

beforeAll(async () => {
  admin = await makePrincipal(db, 'admin', 'contractor');
  const partner = await registerPartner(db, admin, `Server owner ${Date.now()}`);
  project = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: `Server faults ${Date.now()}`, partnerOrganisation: partner }))).id))!;
  token = (await createToken(db, admin, { name: 'faults' })).secret;
});
afterAll(async () => {
  for (const p of started) await p.stop();
  await closeDb();
});

async function server(extra: Record<string, string> = {}) {
  const s = await startServer(PORT, extra);
  started.push(s);
  return s;
}

interface Sent {
  status: number;
  headers: Record<string, string | string[] | undefined>;
  body: string;
}

/** One HTTP request from a chosen local address (127.0.0.2, 127.0.0.3, …: Linux answers on all of 127/8). */
function send(o: { method?: string; path: string; from?: string; headers?: Record<string, string>; body?: string | Buffer }): Promise<Sent> {
  return new Promise((resolve, reject) => {
    const req = httpRequest({ host: '127.0.0.1', port: PORT, method: o.method ?? 'GET', path: o.path, localAddress: o.from ?? '127.0.0.1', headers: o.headers }, (res) => {
      let body = '';
      res.setEncoding('utf8');
      res.on('data', (d) => (body += d));
      res.on('end', () => resolve({ status: res.statusCode!, headers: res.headers, body }));
    });
    req.on('error', reject);
    req.end(o.body);
  });
}

/** A credentials sign-in through next-auth's own endpoints, as the sign-in form makes it. */
async function signIn(email: string, password: string, from: string, forwardedFor?: string): Promise<'ok' | 'refused' | 'limited'> {
  const extra: Record<string, string> = forwardedFor ? { 'x-forwarded-for': forwardedFor } : {};
  const csrf = await send({ path: '/api/auth/csrf', from, headers: extra });
  const cookie = ([] as string[]).concat(csrf.headers['set-cookie'] ?? []).map((c) => c.split(';')[0]).join('; ');
  const body = new URLSearchParams({ csrfToken: JSON.parse(csrf.body).csrfToken, email, password, json: 'true' }).toString();
  const res = await send({ method: 'POST', path: '/api/auth/callback/credentials', from, body, headers: { ...extra, cookie, 'content-type': 'application/x-www-form-urlencoded' } });
  const cookies = ([] as string[]).concat(res.headers['set-cookie'] ?? []).join('\n');
  if (cookies.includes('next-auth.session-token')) return 'ok';
  const location = String(res.headers.location ?? '') + res.body;
  return location.includes('TooManyAttempts') ? 'limited' : 'refused';
}

describe('sign-in limits count the socket address, not a header anyone can send', () => {
  it('locks out the client that failed, not everyone, and rotating X-Forwarded-For does not escape', async () => {
    const s = await server({ SIGNIN_MAX_PER_IP: '5', SIGNIN_MAX_PER_EMAIL: '100' });
    const user = await makePrincipal(db, 'surveyor', 'contractor', admin.organisationName);
    for (let i = 0; i < 5; i++) expect(await signIn(`nobody${i}@fault.example`, 'wrong-password', '127.0.0.2', `198.51.100.${i}`)).toBe('refused');
    // the attacker's address is now limited, whatever it claims to forward for
    expect(await signIn(user.email, 'a-long-test-password', '127.0.0.2', '203.0.113.77')).toBe('limited');
    // anyone else, with or without a forwarded header, still signs in
    expect(await signIn(user.email, 'a-long-test-password', '127.0.0.3')).toBe('ok');
    expect(await signIn(user.email, 'a-long-test-password', '127.0.0.4', '198.51.100.1')).toBe('ok');
    const ips = (await db('sign_in_attempts').where({ email: user.email }).select('ip')).map((r) => r.ip).sort();
    expect(ips).toEqual(['127.0.0.3', '127.0.0.4']);
    await s.stop();
  });

  it('behind a configured proxy, the forwarded client address counts', async () => {
    const s = await server({ TRUSTED_PROXIES: '127.0.0.5', SIGNIN_MAX_PER_IP: '3', SIGNIN_MAX_PER_EMAIL: '100' });
    const user = await makePrincipal(db, 'engineer', 'contractor', admin.organisationName);
    for (let i = 0; i < 3; i++) await signIn(`x${i}@fault.example`, 'wrong-password', '127.0.0.5', '198.51.100.200');
    expect(await signIn(user.email, 'a-long-test-password', '127.0.0.5', '198.51.100.200')).toBe('limited');
    expect(await signIn(user.email, 'a-long-test-password', '127.0.0.5', '198.51.100.201')).toBe('ok');
    await s.stop();
  });
});

describe('request limits at the server', () => {
  let s: Proc;
  beforeAll(async () => {
    s = await server();
  });
  afterAll(() => s.stop());

  it('refuses a declared 600 MB body with 413 before reading it, signed in or not', async () => {
    const t0 = Date.now();
    for (const p of ['/api/auth/callback/credentials', '/api/welcome', '/api/tokens']) {
      const res = await send({ method: 'POST', path: p, headers: { 'content-type': 'application/json', 'content-length': String(600 * 1024 * 1024) } });
      expect(res.status).toBe(413);
      expect(JSON.parse(res.body).error.code).toBe('too_large');
    }
    expect(Date.now() - t0).toBeLessThan(10_000);
  });

  it('refuses a chunked JSON body that grows past the limit with 413, and a text body with 415', async () => {
    // the body streams in 64 KB chunks with no declared length, until the server answers
    let sent = 0;
    const big = await new Promise<number>((resolve, reject) => {
      const req = httpRequest({ host: '127.0.0.1', port: PORT, method: 'POST', path: '/api/welcome', headers: { 'content-type': 'application/json', 'transfer-encoding': 'chunked' } }, (res) => {
        res.resume();
        resolve(res.statusCode!);
      });
      req.on('error', (err) => (sent > 0 ? undefined : reject(err)));
      req.write('{"token":"');
      const chunk = 'x'.repeat(64 * 1024);
      const pump = () => {
        if (req.destroyed || sent > 64 * 1024 * 1024) return;
        sent += chunk.length;
        req.write(chunk, () => setTimeout(pump, 2));
      };
      pump();
    });
    expect(big).toBe(413);
    // refused once past the 1 MB limit, long before the 64 MB this client would have sent
    expect(sent).toBeLessThan(16 * 1024 * 1024);
    const typed = await send({ method: 'POST', path: '/api/tokens', headers: { authorization: `Bearer ${token}`, 'content-type': 'text/plain' }, body: '{"name":"x"}' });
    expect(typed.status).toBe(415);
  });

  it('answers a multipart body without a boundary and NUL characters with 4xx, never 500', async () => {
    const before = await count(db, 'uploads');
    const noBoundary = await send({ method: 'POST', path: `/api/projects/${project.id}/uploads`, headers: { authorization: `Bearer ${token}`, 'content-type': 'multipart/form-data' }, body: 'x' });
    expect(noBoundary.status).toBe(400);
    expect(JSON.parse(noBoundary.body).error.message).toMatch(/boundary/);
    for (const p of [`/api/projects/${project.id}/sections?format=%00`, '/projects?q=%00', '/sign-in?callbackUrl=%00']) {
      const res = await send({ path: p, headers: { authorization: `Bearer ${token}` } });
      expect(res.status, p).toBe(400);
    }
    const field = await send({
      method: 'POST',
      path: `/api/projects/${project.id}/uploads`,
      headers: { authorization: `Bearer ${token}`, 'content-type': 'multipart/form-data; boundary=XYZ' },
      body: `--XYZ\r\nContent-Disposition: form-data; name="crew"\r\n\r\nA\u0000B\r\n--XYZ\r\nContent-Disposition: form-data; name="file"; filename="a.gpx"\r\n\r\n${gpxTrack(3)}\r\n--XYZ--\r\n`,
    });
    expect(field.status).toBe(422);
    expect(await count(db, 'uploads')).toBe(before);
  });
});

describe('kill -9 of the server mid-upload', () => {
  it('leaves nothing behind after the sweep, and a retry stores one copy', async () => {
    const storage = process.env.STORAGE_DIR!;
    const tmpRoot = process.env.UPLOAD_TMP_DIR!;
    const projectFolder = path.join(storage, 'uploads', project.id);
    const before = { uploads: await count(db, 'uploads'), files: await countFiles(projectFolder) };
    const gpx = gpxTrack(120_000, { seed: 7 });
    const boundary = 'faultBoundary42';
    const head = `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="long walk.gpx"\r\nContent-Type: application/gpx+xml\r\n\r\n`;
    const tail = `\r\n--${boundary}--\r\n`;
    const headers = { authorization: `Bearer ${token}`, 'content-type': `multipart/form-data; boundary=${boundary}`, 'content-length': String(Buffer.byteLength(head + gpx + tail)) };

    // 1. killed while the body arrives: the temporary file is left
    let s = await server();
    const slow = httpRequest({ host: '127.0.0.1', port: PORT, method: 'POST', path: `/api/projects/${project.id}/uploads`, headers });
    slow.on('error', () => undefined);
    slow.write(head + gpx.slice(0, gpx.length / 2));
    await waitFor('the temporary file', async () => (await countFiles(tmpRoot)) > 0, 20_000);
    await s.kill9();
    slow.destroy();
    expect(await countFiles(tmpRoot)).toBeGreaterThan(0);

    // 2. killed after the original is stored and before its row commits: the original is left
    s = await server();
    const whole = httpRequest({ host: '127.0.0.1', port: PORT, method: 'POST', path: `/api/projects/${project.id}/uploads`, headers });
    whole.on('error', () => undefined);
    whole.end(head + gpx + tail);
    await waitFor('the stored original', async () => (await countFiles(projectFolder)) > before.files, 60_000, 5);
    await s.kill9();
    expect(await count(db, 'uploads')).toBe(before.uploads);
    expect(await countFiles(projectFolder)).toBeGreaterThan(before.files);

    // 3. the worker sweeps at start-up (the age limit is 0 here, so nothing counts as in flight)
    const w = await startWorker({ ORPHAN_MIN_AGE_SECONDS: '0' });
    started.push(w);
    await waitFor('the sweep', async () => (await countFiles(tmpRoot)) === 0 && (await countFiles(projectFolder)) === before.files, 20_000, 200);
    expect(await readdir(tmpRoot).catch(() => [])).toEqual([]);
    await w.stop();

    // 4. the retry stores one copy and one row
    s = await server();
    const retry = await send({ method: 'POST', path: `/api/projects/${project.id}/uploads`, headers, body: head + gpx + tail });
    expect(retry.status).toBe(201);
    expect(await count(db, 'uploads')).toBe(before.uploads + 1);
    expect(await countFiles(projectFolder)).toBe(before.files + 1);
    await sleep(100);
    await s.stop();
  });
});
