import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync } from 'node:fs';
import { mkdtemp, readFile, readdir, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { check } from '@placemarkio/check-geojson';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { previousIssued } from '@/db/handovers';
import { AppError } from '@/lib/api/errors';
import { LAYERS, shortNameProblems } from '@/lib/handover/layers';
import { parseRange } from '@/lib/handover/range';
import { buildPackage } from '@/lib/services/handover-build';
import { createHandover, createHandoverSchema, handoverStatus } from '@/lib/services/handovers';
import { originalsStore } from '@/lib/storage/originals-store';
import { createToken } from '@/lib/services/tokens';
import { NextRequest } from 'next/server';
import { GET as downloadRoute } from '@/app/api/handovers/[handoverId]/download/route';
import { GET as statusRoute } from '@/app/api/handovers/[handoverId]/route';
import { POST as buildRoute } from '@/app/api/projects/[projectId]/handovers/route';
import { count } from '../helpers/fixtures';
import { makeRecordPlan, type RecordPlan } from '../helpers/record-plan';

// The handover package builder (issue 16, helper E1), checked by independent readers: GDAL's ogrinfo for
// every layer in every format, Debian's openpyxl for the workbook, @placemarkio/check-geojson for RFC 7946.

const db = getDb();
let plan: RecordPlan;
const sections: string[] = [];

async function sectionOf(from: number, to: number, review = 'approved', status = 'as_planned', ref = 'S-1', north = 0): Promise<string> {
  const [a, b] = [plan.at(from, north), plan.at(to, north)];
  const [row] = await db('sections').insert({
    project_id: plan.project.id, planned_route_ref: ref, status, from_chainage_m: from, to_chainage_m: to,
    geom: db.raw('ST_SetSRID(ST_MakeLine(ST_MakePoint(?, ?), ST_MakePoint(?, ?)), 4326)', [a[0], a[1], b[0], b[1]]),
    length_m: to - from, max_offset_m: 0.1, p95_offset_m: 0.08, accuracy_m: 0.05, laid_on: '2026-11-03', first_run: 1, last_run: 1, review,
  }).returning('id');
  return row.id;
}

async function issue(scope: Record<string, unknown> = {}) {
  const out = await createHandover(db, plan.engineer, plan.project, createHandoverSchema.parse({ scope, note: 'test' }));
  const { runJob } = await import('@/lib/jobs/queue');
  await runJob(db, out.job.id);
  return out;
}

async function unzip(key: string): Promise<string> {
  const dir = await mkdtemp(path.join(os.tmpdir(), 'tb-ho-test-'));
  const zip = path.join(dir, 'p.zip');
  const chunks: Buffer[] = [];
  for await (const c of originalsStore().get(key)) chunks.push(c as Buffer);
  await (await import('node:fs/promises')).writeFile(zip, Buffer.concat(chunks));
  execFileSync('/usr/bin/python3', ['-m', 'zipfile', '-e', zip, path.join(dir, 'x')]);
  return path.join(dir, 'x');
}

const ogrinfo = (args: string[]) => execFileSync('ogrinfo', ['-ro', '-so', ...args], { encoding: 'utf8' });
const ogrAll = (args: string[]) => execFileSync('ogrinfo', ['-ro', '-al', '-q', ...args], { encoding: 'utf8' });

beforeAll(async () => {
  plan = await makeRecordPlan(db, 'Handover build', [9.7, 52.7]);
  sections.push(await sectionOf(0, 120), await sectionOf(120, 200, 'approved', 'deviates'), await sectionOf(0, 9, 'approved', 'as_planned', 'X-1'));
  await sectionOf(0, 9, 'pending', 'as_planned', 'X-2'); // not approved: not packaged
  await db('road_crossings').insert({ project_id: plan.project.id, route_id: plan.routes.get('X-1'), from_chainage_m: 0, to_chainage_m: 9, built: true, built_on: '2026-11-04', length_m: 9, duct_count: 1, address_ref: 'A-2' });
  await db('depth_readings').insert([30, 60].map((ch, i) => ({ project_id: plan.project.id, route_id: plan.routes.get('S-1'), chainage_m: ch, offset_m: 0, geom: db.raw('ST_SetSRID(ST_MakePoint(?, ?), 4326)', plan.at(ch, 0)), cover_m: 0.42 + i / 100, trench_depth_m: 0.48, source: 'typed' })));
  await db('addresses').insert([['A-1', 50, 12, true], ['A-2', 40, -20, true], ['A-3', 400, 30, false]].map(([key, e, n, passed]) => ({
    project_id: plan.project.id, key, street: 'Test Street', number: String(e), units: 2, geom: db.raw('ST_SetSRID(ST_MakePoint(?, ?), 4326)', plan.at(e as number, n as number)), passed, passed_approved: passed,
  })));
});
afterAll(() => closeDb());

describe('layers', () => {
  it('short names fit a DBF (≤ 10 characters, unique per layer)', () => {
    expect(shortNameProblems()).toEqual([]);
    expect(shortNameProblems([{ name: 'x', title: 'x', geometry: 'Point', fields: [{ name: 'a', short: 'abcdefghijk', type: 'string', description: '' }, { name: 'b', short: 'ABCDEFGHIJK', type: 'string', description: '' }] }])).toHaveLength(3);
  });
  it('byte ranges per RFC 9110 §14.1.2', () => {
    expect(parseRange('bytes=0-9', 100)).toEqual({ start: 0, end: 9 });
    expect(parseRange('bytes=90-', 100)).toEqual({ start: 90, end: 99 });
    expect(parseRange('bytes=-10', 100)).toEqual({ start: 90, end: 99 });
    expect(parseRange('bytes=95-200', 100)).toEqual({ start: 95, end: 99 });
    expect(parseRange('bytes=100-', 100)).toBe('unsatisfiable');
    expect(parseRange('bytes=0-1,5-6', 100)).toBeNull();
  });
});

describe('a built package', () => {
  let dir: string;
  let h: Awaited<ReturnType<typeof handoverStatus>>['handover'];

  beforeAll(async () => {
    const out = await issue();
    h = (await handoverStatus(db, out.handover.id)).handover;
    expect(h.status, String(h.failureReason)).toBe('issued');
    dir = await unzip((await db('handovers').where({ id: h.id }).first()).storage_key);
  });
  afterAll(() => rm(path.dirname(dir), { recursive: true, force: true }));

  it('holds every layer in every format, read back by GDAL with counts, types, CRS and a known value [computed with GDAL 3.6 ogrinfo]', async () => {
    const expected: Record<string, [number, string]> = {
      as_built_sections: [3, 'Line String'], planned_routes: [2, 'Line String'], road_crossings: [1, 'Line String'], test_pits: [0, 'Point'],
      utility_crossings: [0, 'Point'], depth_readings: [2, 'Point'], photo_points: [0, 'Point'], addresses: [3, 'Point'],
    };
    for (const def of LAYERS) {
      const [n, type] = expected[def.name];
      for (const file of [`geojson/${def.name}.geojson`, `kml/${def.name}.kml`, `shp/${def.name}.shp`]) {
        const info = ogrinfo([path.join(dir, file), def.name]);
        expect(info, file).toContain(`Feature Count: ${n}`);
        if (n > 0 && !file.endsWith('.kml')) expect(info, file).toContain(`Geometry: ${type}`);
        expect(info, file).toMatch(/WGS 84|WGS_1984/);
      }
      const g = ogrinfo([path.join(dir, 'gpkg/handover.gpkg'), def.name]);
      expect(g).toContain(`Feature Count: ${n}`);
      expect(g).toContain(`Geometry: ${type}`);
      expect(g).toMatch(/ID\["EPSG",4326\]/); // the layer's CRS is EPSG:4326
    }
    // a known attribute value: the deviating section's status, under its full name and its short name
    expect(ogrAll([path.join(dir, 'geojson/as_built_sections.geojson')])).toContain('status (String) = deviates');
    expect(ogrAll([path.join(dir, 'shp/as_built_sections.shp')])).toMatch(/p95_off_m \(Real\) = 0\.08/);
    expect(ogrAll([path.join(dir, 'kml/addresses.kml')])).toContain('address_key (String) = A-2');
    expect(ogrAll([path.join(dir, 'gpkg/handover.gpkg'), 'depth_readings'])).toContain('cover_m (Real) = 0.43');
  });

  it('writes GeoJSON per RFC 7946: valid, no crs, ≤ 7 decimals, a bbox holding every position, no polygon rings to wind', async () => {
    for (const def of LAYERS) {
      const text = await readFile(path.join(dir, `geojson/${def.name}.geojson`), 'utf8');
      const fc = check(text) as unknown as { bbox?: number[]; features: { geometry: { coordinates: unknown } }[]; crs?: unknown }; // throws on an invalid object [@placemarkio/check-geojson]
      expect(fc.crs).toBeUndefined(); // RFC 7946 §4: no crs member
      const positions = fc.features.flatMap((f) => (typeof (f.geometry.coordinates as number[])[0] === 'number' ? [f.geometry.coordinates as number[]] : (f.geometry.coordinates as number[][])));
      for (const m of text.matchAll(/-?\d+\.(\d+)(?=[,\]])/g)) expect(m[1].length).toBeLessThanOrEqual(7); // §11.2
      if (positions.length) {
        const [w, s, e, n] = fc.bbox!; // §5: [west, south, east, north]
        for (const [x, y] of positions) expect(x >= w && x <= e && y >= s && y <= n).toBe(true);
        expect(positions.some(([x]) => x === w) && positions.some(([, y]) => y === n)).toBe(true);
      } else expect(fc.bbox).toBeUndefined();
      // §3.1.6 winding applies to polygons only; every layer here is points or lines
      expect(['Point', 'LineString']).toContain(def.geometry);
    }
  });

  it('has a workbook openpyxl reads: sheets, a header with units, a date cell as a date, the trench total and volumes [computed with openpyxl]', async () => {
    const script = `import json,sys,openpyxl,datetime
wb=openpyxl.load_workbook(sys.argv[1])
s=wb['Sections']; q=wb['Quantities']
print(json.dumps({'sheets':wb.sheetnames,'header':[c.value for c in s[1]],'laid':isinstance(s['K2'].value,datetime.datetime) and s['K2'].value.strftime('%Y-%m-%d'),
 'freeze':s.freeze_panes,'filter':s.auto_filter.ref,'q':{r[0].value:r[1].value for r in q.iter_rows(min_row=2)}}))`;
    const out = JSON.parse(execFileSync('/usr/bin/python3', ['-c', script, path.join(dir, 'workbook/schedules.xlsx')], { encoding: 'utf8' }));
    expect(out.sheets).toEqual(['Summary', 'Sections', 'Ducts', 'Depths', 'Road crossings', 'Test pits and utilities', 'Restoration', 'Households passed', 'Deviations', 'Quantities']);
    expect(out.header.slice(0, 6)).toEqual(['Section id', 'Route', 'Street', 'From chainage (m)', 'To chainage (m)', 'Length (m)']);
    expect(out.laid).toBe('2026-11-03');
    expect(out.freeze).toBe('A2');
    expect(out.filter).toMatch(/^A1:L1$/);
    expect(out.q['Trench length']).toBeCloseTo(209, 6); // 120 + 80 + 9 m
    // 209 m × 0.024 m × 0.48 m = 2.40768 m³ (0.01152 m³/m, ../shared/REFERENCES.md) [computed]
    const spoil = Object.entries(out.q).find(([k]) => k.startsWith('Spoil'))![1] as number;
    expect(spoil).toBeCloseTo(209 * plan.project.records.trenchWidthMm / 1000 * plan.project.records.trenchDepthMm / 1000, 3);
  });

  it('lists every file in the manifest with its bytes and SHA-256, and says the cautions in README.txt', async () => {
    const manifest = JSON.parse(await readFile(path.join(dir, 'manifest.json'), 'utf8'));
    expect(manifest.revision).toBe(h.revision);
    expect(manifest.recordCounts.as_built_sections).toBe(3);
    for (const f of manifest.files as { path: string; bytes: number; sha256: string }[]) {
      const bytes = await readFile(path.join(dir, f.path));
      expect(bytes.length, f.path).toBe(f.bytes);
      expect(createHash('sha256').update(bytes).digest('hex'), f.path).toBe(f.sha256);
    }
    const listed = new Set(manifest.files.map((f: { path: string }) => f.path));
    for (const d of ['geojson', 'kml', 'shp', 'gpkg', 'workbook']) for (const f of await readdir(path.join(dir, d))) expect(listed.has(`${d}/${f}`), f).toBe(true);
    const readme = await readFile(path.join(dir, 'README.txt'), 'utf8');
    expect(readme).toContain('verified on site before digging');
    expect(readme).toContain('p95_offset_m = p95_off_m');
    expect(h.sha256).toBe(createHash('sha256').update(await readFile(path.join(path.dirname(dir), 'p.zip'))).digest('hex'));
  });

  it('is downloaded through the route whole or by byte range (206, 416), its status read, a build refused to the owner', async () => {
    const owner = (await createToken(db, plan.owner, { name: 'ho' })).secret;
    const call = (handler: (req: NextRequest, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>, method: string, url: string, params: Record<string, string>, headers: Record<string, string> = {}, body?: unknown) =>
      handler(new NextRequest(`http://127.0.0.1${url}`, { method, headers: { authorization: `Bearer ${owner}`, 'content-type': 'application/json', ...headers }, body: body === undefined ? undefined : JSON.stringify(body) }), { params: Promise.resolve(params) });
    const zip = await readFile(path.join(path.dirname(dir), 'p.zip'));
    const whole = await call(downloadRoute, 'GET', `/api/handovers/${h.id}/download`, { handoverId: h.id });
    expect(whole.status).toBe(200);
    expect(whole.headers.get('accept-ranges')).toBe('bytes');
    expect(Buffer.from(await whole.arrayBuffer()).equals(zip)).toBe(true);
    const part = await call(downloadRoute, 'GET', `/api/handovers/${h.id}/download`, { handoverId: h.id }, { range: 'bytes=10-109' });
    expect(part.status).toBe(206);
    expect(part.headers.get('content-range')).toBe(`bytes 10-109/${zip.length}`);
    expect(Buffer.from(await part.arrayBuffer()).equals(zip.subarray(10, 110))).toBe(true);
    const bad = await call(downloadRoute, 'GET', `/api/handovers/${h.id}/download`, { handoverId: h.id }, { range: `bytes=${zip.length}-` });
    expect(bad.status).toBe(416);
    expect(bad.headers.get('content-range')).toBe(`bytes */${zip.length}`);
    const st = await call(statusRoute, 'GET', `/api/handovers/${h.id}`, { handoverId: h.id });
    expect(((await st.json()) as { handover: { status: string; progress: number } }).handover).toMatchObject({ status: 'issued', progress: 1 });
    const refused = await call(buildRoute, 'POST', `/api/projects/${plan.project.id}/handovers`, { projectId: plan.project.id }, {}, { scope: {} });
    expect(refused.status).toBe(403);
  });

  it('is byte-identical when the same revision is built again from the same data', async () => {
    const row = await db('handovers').where({ id: h.id }).first();
    const inp = { project: plan.project, revision: row.revision, createdAt: row.created_at, createdByName: 'x', scope: {}, note: '', previous: null };
    const a = await buildPackage(db, inp, async () => undefined);
    await new Promise((r) => setTimeout(r, 2100)); // a later clock second must not show in the bytes
    const b = await buildPackage(db, inp, async () => undefined);
    try {
      expect(a.sha256).toBe(b.sha256);
      expect(a.sizeBytes).toBe(b.sizeBytes);
    } finally {
      await rm(a.tmpDir, { recursive: true, force: true });
      await rm(b.tmpDir, { recursive: true, force: true });
    }
  });
});

describe('revisions and failures', () => {
  it('reports exactly what changed against the previous issued revision', async () => {
    const prev = (await db('handovers').where({ project_id: plan.project.id, status: 'issued' }).orderBy('revision', 'desc').first());
    await db('sections').where({ id: sections[1] }).update({ status: 'as_planned' });
    await db('sections').where({ id: sections[2] }).update({ review: 'pending' });
    const added = await sectionOf(0, 9, 'approved', 'as_planned', 'X-3');
    await db('addresses').where({ project_id: plan.project.id, key: 'A-3' }).update({ passed: true, passed_approved: true });
    await db('addresses').where({ project_id: plan.project.id, key: 'A-1' }).update({ passed: false, passed_approved: false });
    const out = await issue();
    const s = (await handoverStatus(db, out.handover.id)).handover;
    expect(s.status).toBe('issued');
    const r = s.changeReport as Record<string, unknown>;
    expect(r.previousRevision).toBe(prev.revision);
    expect((r.sectionsAdded as { id: string }[]).map((x) => x.id)).toEqual([added]);
    expect((r.sectionsRemoved as { id: string }[]).map((x) => x.id)).toEqual([sections[2]]);
    expect(r.sectionsChanged).toEqual([expect.objectContaining({ id: sections[1], changed: ['status'] })]);
    expect(r.passedGained).toEqual(['A-3']);
    expect(r.passedLost).toEqual(['A-1']);
    expect((await previousIssued(db, plan.project.id, s.revision + 1))?.revision).toBe(s.revision);
  });

  it('refuses a scope with nothing to package (422) and stores nothing', async () => {
    const before = await count(db, 'handovers');
    const err = await createHandover(db, plan.engineer, plan.project, createHandoverSchema.parse({ scope: { routes: ['X-2'] } })).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(AppError);
    expect((err as AppError).code).toBe('nothing_to_package');
    expect(await count(db, 'handovers')).toBe(before);
  });

  it('leaves a failed package with its reason and no stored file when the build fails', async () => {
    const out = await createHandover(db, plan.engineer, plan.project, createHandoverSchema.parse({ scope: { routes: ['X-3'] } }));
    // the approval is withdrawn between the request and the build: the job finds nothing to package
    await db('sections').where({ project_id: plan.project.id, planned_route_ref: 'X-3' }).update({ review: 'pending' });
    const { runJob } = await import('@/lib/jobs/queue');
    await runJob(db, out.job.id);
    const row = await db('handovers').where({ id: out.handover.id }).first();
    expect(row.status).toBe('failed');
    expect(row.failure_reason).toContain('Nothing to package');
    expect(row.storage_key).toBeNull();
    const key = `handovers/${plan.project.id}/${out.handover.id}/handover-r${row.revision}.zip`;
    expect(await originalsStore().size(key)).toBeUndefined();
    expect(existsSync(path.join(os.tmpdir(), 'nothing'))).toBe(false);
    expect((await db('audit_log').where({ object_id: out.handover.id }).select('action')).map((a: { action: string }) => a.action).sort()).toEqual(['build', 'fail']);
  });
});

describe("in the project's coordinate system, with the accuracy stated by source class", () => {
  let dir: string;
  let manifest: { positionalAccuracy: { bySource: { source: string; metres: number }[] }; coordinateSystem: string };

  beforeAll(async () => {
    // sources: the long section from an RTK survey, the deviating one from a handheld walk and the survey together
    const up = async (cls: string, sigma: number) => (await db('uploads').insert({ id: (await import('node:crypto')).randomUUID(), project_id: plan.project.id, sha256: createHash('sha256').update(cls).digest('hex'), size_bytes: 1, file_name: `${cls}.gpx`, status: 'stored', accuracy_class: cls, sigma_m: sigma, content: 'trench' }).returning('id'))[0].id as string;
    const rtk = await up('rtk_gnss', 0.02);
    const walk = await up('handheld_gnss', 4);
    await db('sections').where({ id: sections[0] }).update({ source_upload_ids: [rtk] });
    await db('sections').where({ id: sections[1] }).update({ source_upload_ids: [walk, rtk], accuracy_m: 9.79 });
    await db('projects').where({ id: plan.project.id }).update({ default_srid: 25832 });
    const { getProject } = await import('@/db/projects');
    plan.project = (await getProject(db, plan.project.id))!;
    const out = await issue({ projectCrs: true });
    const row = await db('handovers').where({ id: out.handover.id }).first();
    expect(row.status, String(row.failure_reason)).toBe('issued');
    dir = await unzip(row.storage_key);
    manifest = JSON.parse(await readFile(path.join(dir, 'manifest.json'), 'utf8'));
  });
  afterAll(() => rm(path.dirname(dir), { recursive: true, force: true }));

  it('writes the shapefiles and GeoPackage again in EPSG:25832, each coordinate where proj4 puts it [proj4 with the EPSG:25832 parameters, read back by GDAL ogrinfo]', async () => {
    const { default: proj4 } = await import('proj4');
    // EPSG:25832, ETRS89 / UTM zone 32N: GRS80, zone 32 (EPSG registry); ETRS89 taken as WGS 84 at this tolerance
    const utm = proj4('EPSG:4326', '+proj=utm +zone=32 +ellps=GRS80 +towgs84=0,0,0,0,0,0,0 +units=m +no_defs');
    const wgs = JSON.parse(await readFile(path.join(dir, 'geojson/as_built_sections.geojson'), 'utf8')) as { features: { properties: { section_id: string }; geometry: { coordinates: [number, number][] } }[] };
    for (const file of ['gpkg/handover_25832.gpkg', 'shp/as_built_sections_25832.shp']) {
      const layer = file.endsWith('.gpkg') ? 'as_built_sections' : 'as_built_sections_25832';
      const info = ogrinfo([path.join(dir, file), layer]);
      expect(info, file).toMatch(/ID\["EPSG",25832\]|ETRS_1989_UTM_Zone_32N|ETRS89 \/ UTM zone 32N/);
      const all = ogrAll([path.join(dir, file), layer]);
      const lines = [...all.matchAll(/LINESTRING \(([^)]+)\)/g)].map((m) => m[1].split(',').map((p) => p.trim().split(' ').map(Number)));
      expect(lines.length, file).toBe(wgs.features.length);
      const want = wgs.features.flatMap((f) => f.geometry.coordinates.map((c) => utm.forward(c)));
      const got = lines.flat();
      expect(got.length).toBe(want.length);
      for (const [i, [x, y]] of got.entries()) {
        expect(Math.abs(x - want[i][0]), `${file} x ${i}`).toBeLessThan(0.01);
        expect(Math.abs(y - want[i][1]), `${file} y ${i}`).toBeLessThan(0.01);
      }
    }
    // the WGS 84 copies are still there, and the manifest says both
    expect(ogrinfo([path.join(dir, 'gpkg/handover.gpkg'), 'as_built_sections'])).toMatch(/ID\["EPSG",4326\]/);
    expect(manifest.coordinateSystem).toContain('_25832');
  });

  it('states the metres by source class: RTK 120 m, handheld with RTK 80 m (the approved sections left after the revisions above)', () => {
    const by = Object.fromEntries(manifest.positionalAccuracy.bySource.map((g) => [g.source, g.metres]));
    expect(by).toEqual({ 'RTK GNSS': 120, 'Handheld GNSS + RTK GNSS': 80 });
  });
  it('says the same in README.txt', async () => {
    const readme = await readFile(path.join(dir, 'README.txt'), 'utf8');
    expect(readme).toContain('By source: RTK GNSS 120 m (0.05–0.05 m); Handheld GNSS + RTK GNSS 80 m (9.79–9.79 m)');
    expect(readme).toContain('≤ 0.1 m: 120 m; > 5 m: 80 m');
  });
});
