import { execFileSync } from 'node:child_process';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { NextRequest } from 'next/server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getProject, type Project } from '@/db/projects';
import type { Principal } from '@/lib/auth/principal';
import { importAddresses } from '@/lib/services/address-import';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { createToken } from '@/lib/services/tokens';
import { GET as listRoute } from '@/app/api/projects/[projectId]/addresses/route';
import { makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf } from '../helpers/upload-form';

const STORAGE = path.resolve(__dirname, '../../.data/test-storage-address-export');
process.env.STORAGE_DIR = STORAGE;
const db = getDb();
let project: Project;
let token: string;
let strangerToken: string;
let dir: string;

// Quillhaven (fictional); a street name with a comma and quotes, so the CSV must quote it
const REGISTER = [
  'UPRN,Street,House No,Postcode,Town,Households,Lon,Lat',
  'QH-1,Cobbler Walk,12a,QH1 4AB,Quillhaven,1,9.200101234,52.200104321',
  'QH-2,Cobbler Walk,14,QH1 4AB,Quillhaven,6,9.20030,52.20012',
  'QH-3,Lanternfield Road,7,QH1 4AC,Quillhaven,2,9.20100,52.20040',
  'QH-4,"Saltmarsh Row, ""The Old Rope Works""",3,QH1 4AD,Quillhaven,24,9.20150,52.19980',
  'QH-5,Wickham Rise,1,QH1 4AE,Quillhaven,1,9.19950,52.20090',
].join('\n') + '\n';

const call = (url: string, t = token) => listRoute(new NextRequest(`http://127.0.0.1${url}`, { headers: { authorization: `Bearer ${t}` } }), { params: Promise.resolve({ projectId: project.id }) });

beforeAll(async () => {
  await rm(STORAGE, { recursive: true, force: true });
  dir = await mkdtemp(path.join(os.tmpdir(), 'address-export-'));
  const admin = await makePrincipal(db, 'admin', 'contractor');
  const engineer: Principal = await makePrincipal(db, 'engineer', 'contractor', admin.organisationName);
  const partner = await registerPartner(db, admin, `Export owner ${Date.now()}`);
  project = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: `Address export ${Date.now()}`, partnerOrganisation: partner }))).id))!;
  const form = await formOf([{ name: 'register.csv', bytes: REGISTER }], {});
  try {
    await importAddresses(db, engineer, project, form);
  } finally {
    await form.cleanup();
  }
  // the derived state the households job would write, set here so that the export is tested on its own
  await db('addresses').where({ project_id: project.id, key: 'QH-1' }).update({ passed: true, passed_approved: true, side: 'route' });
  await db('addresses').where({ project_id: project.id, key: 'QH-2' }).update({ passed: true, side: 'across' });
  await db('addresses').where({ project_id: project.id }).whereIn('key', ['QH-3', 'QH-4', 'QH-5']).update({ not_passed_reason: 'no built stretch in front of it' });
  await db('addresses').where({ project_id: project.id, key: 'QH-3' }).update({ connected: true, connected_on: '2026-11-20', connected_source: 'hand' });
  const maintenance = await makePrincipal(db, 'maintenance', 'contractor', admin.organisationName);
  token = (await createToken(db, maintenance, { name: 'export' })).secret;
  const stranger = await makePrincipal(db, 'engineer', 'contractor');
  strangerToken = (await createToken(db, stranger, { name: 'export' })).secret;
});

afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
  await rm(STORAGE, { recursive: true, force: true });
  await closeDb();
});

describe('GET /api/projects/{projectId}/addresses', () => {
  it('lists by status for every role; another organisation gets 404; an unknown status or format is a 400 naming it', async () => {
    const keys = async (q: string) => ((await (await call(`/api/projects/${project.id}/addresses${q}`)).json()) as { addresses: { key: string }[] }).addresses.map((a) => a.key);
    // by street, then number
    expect(await keys('')).toEqual(['QH-1', 'QH-2', 'QH-3', 'QH-4', 'QH-5']);
    expect((await keys('?status=passed')).sort()).toEqual(['QH-1', 'QH-2']);
    expect((await keys('?status=not_passed')).sort()).toEqual(['QH-3', 'QH-4', 'QH-5']);
    expect(await keys('?status=connected')).toEqual(['QH-3']);
    expect((await call(`/api/projects/${project.id}/addresses`, strangerToken)).status).toBe(404);
    const badStatus = await call(`/api/projects/${project.id}/addresses?status=done`);
    expect(badStatus.status).toBe(400);
    expect(await badStatus.json()).toMatchObject({ error: { code: 'bad_parameter', message: 'status must be one of passed, not_passed, connected (got "done").' } });
    const badFormat = await call(`/api/projects/${project.id}/addresses?format=kml`);
    expect(badFormat.status).toBe(400);
    expect(await badFormat.json()).toMatchObject({ error: { code: 'bad_parameter', message: 'format must be one of json, geojson, csv, xlsx (got "kml").' } });
  });

  it('GeoJSON: RFC 7946 (no crs, 7 decimals, bbox), read back by GDAL ogrinfo', async () => {
    const res = await call(`/api/projects/${project.id}/addresses?format=geojson`);
    expect(res.headers.get('content-type')).toBe('application/geo+json');
    const text = await res.text();
    const fc = JSON.parse(text);
    // RFC 7946 §4: WGS 84 only, no "crs" member; §5: bbox is [west, south, east, north] [published]
    expect(fc.crs).toBeUndefined();
    expect(fc.bbox).toEqual([9.1995, 52.1998, 9.2015, 52.2009]);
    expect(fc.features.find((f: { id: string }) => f.id === 'QH-1').geometry.coordinates).toEqual([9.2001012, 52.2001043]);
    const file = path.join(dir, 'addresses.geojson');
    await writeFile(file, text);
    // GDAL 3.6's GeoJSON driver, an independent reader [computed with GDAL ogrinfo]
    const out = execFileSync('ogrinfo', ['-ro', '-al', file], { encoding: 'utf8' });
    expect(out).toMatch(/Geometry: Point/);
    expect(out).toMatch(/Feature Count: 5/);
    expect(out).toMatch(/Extent: \(9\.199500, 52\.199800\) - \(9\.201500, 52\.200900\)/);
    const qh4 = out.split(/OGRFeature\(/).find((b) => b.includes('id (String) = QH-4'))!;
    expect(qh4).toMatch(/street \(String\) = Saltmarsh Row, "The Old Rope Works"/);
    expect(qh4).toMatch(/units \(Integer\) = 24/);
    expect(qh4).toMatch(/passed \(Integer\(Boolean\)\) = 0/);
    expect(qh4).toMatch(/notPassedReason \(String\) = no built stretch in front of it/);
    expect(qh4).toMatch(/POINT \(9\.2015 52\.1998\)/);
    const qh2 = out.split(/OGRFeature\(/).find((b) => b.includes('id (String) = QH-2'))!;
    expect(qh2).toMatch(/passed \(Integer\(Boolean\)\) = 1/);
    expect(qh2).toMatch(/side \(String\) = across/);
  });

  it('CSV: the same columns plus lon/lat, read by Python\'s csv module', async () => {
    const res = await call(`/api/projects/${project.id}/addresses?format=csv&status=connected`);
    expect(res.headers.get('content-type')).toMatch(/^text\/csv/);
    const file = path.join(dir, 'addresses.csv');
    await writeFile(file, await res.text());
    // Python's csv module (RFC 4180 dialect "excel"), an independent reader [computed with python3 csv]
    const script = 'import csv, json, sys\nprint(json.dumps(list(csv.DictReader(open(sys.argv[1], newline="", encoding="utf-8")))))';
    const rows = JSON.parse(execFileSync('/usr/bin/python3', ['-c', script, file], { encoding: 'utf8' }));
    expect(rows).toEqual([{ key: 'QH-3', street: 'Lanternfield Road', number: '7', postcode: 'QH1 4AC', units: '2', passed: 'false', passedApproved: 'false', connected: 'true', servingRouteRef: '', side: '', notPassedReason: 'no built stretch in front of it', lon: '9.201', lat: '52.2004' }]);
    const all = path.join(dir, 'all.csv');
    await writeFile(all, await (await call(`/api/projects/${project.id}/addresses?format=csv`)).text());
    const every = JSON.parse(execFileSync('/usr/bin/python3', ['-c', script, all], { encoding: 'utf8' }));
    expect(every.find((r: { key: string }) => r.key === 'QH-4').street).toBe('Saltmarsh Row, "The Old Rope Works"');
  });

  it('Excel: frozen header, autofilter, yes/no, the date as a date, a summary of the counts, read by openpyxl', async () => {
    const res = await call(`/api/projects/${project.id}/addresses?format=xlsx`);
    const file = path.join(dir, 'addresses.xlsx');
    await writeFile(file, Buffer.from(await res.arrayBuffer()));
    // Debian's python3-openpyxl under /usr/bin/python3, an independent reader [computed with openpyxl]
    const script = [
      'import json, sys, openpyxl',
      'wb = openpyxl.load_workbook(sys.argv[1])',
      'ws = wb["Addresses"]',
      'rows = list(ws.iter_rows(values_only=True))',
      'print(json.dumps({"sheets": wb.sheetnames, "freeze": ws.freeze_panes, "filter": ws.auto_filter.ref, "header": rows[0], "rows": [[str(v) if v is not None else None for v in r] for r in rows[1:]], "types": [type(v).__name__ for v in rows[3]], "summary": [list(r) for r in wb["Summary"].iter_rows(values_only=True)]}))',
    ].join('\n');
    const got = JSON.parse(execFileSync('/usr/bin/python3', ['-c', script, file], { encoding: 'utf8' }));
    expect(got.sheets).toEqual(['Addresses', 'Summary']);
    expect(got.freeze).toBe('A2');
    expect(got.filter).toBe('A1:N6');
    expect(got.header).toEqual(['Key', 'Street', 'Number', 'Postcode', 'Households (units)', 'Passed', 'Passed and approved', 'Connected', 'Connected on', 'Serving route', 'Side', 'Why not passed', 'Longitude (° WGS 84)', 'Latitude (° WGS 84)']);
    const byKey = Object.fromEntries(got.rows.map((r: string[]) => [r[0], r]));
    expect(byKey['QH-1'].slice(0, 8)).toEqual(['QH-1', 'Cobbler Walk', '12a', 'QH1 4AB', '1', 'yes', 'yes', 'no']);
    expect(byKey['QH-2'][10]).toBe('across the street');
    // the connection date is a date cell (OOXML serial date, ECMA-376), read back as a datetime
    expect(byKey['QH-3'][8]).toBe('2026-11-20 00:00:00');
    const qh3 = got.rows.findIndex((r: string[]) => r[0] === 'QH-3');
    expect(qh3).toBe(2);
    expect(got.types[4]).toBe('int');
    expect(got.types[8]).toBe('datetime');
    expect(got.types[12]).toBe('float');
    expect(got.summary).toEqual([
      ['Figure', 'Count'], ['Project', project.name], ['Addresses', 5], ['Households (units)', 34], ['Households with a serving route', 0],
      ['Addresses passed', 2], ['Households passed', 7], ['Households passed and approved', 1], ['Addresses connected', 1], ['Households connected', 2],
    ]);
  });
});
