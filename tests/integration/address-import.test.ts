import { execFileSync } from 'node:child_process';
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { NextRequest } from 'next/server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { describeAudit } from '@/components/audit-words';
import { getAddressImport, listAddressImports } from '@/db/address-imports';
import { getAddressByKey, listAddresses } from '@/db/addresses';
import { closeDb, getDb } from '@/db/client';
import { getProject, type Project } from '@/db/projects';
import { committedOriginalKeys } from '@/db/stored-files';
import { AppError } from '@/lib/api/errors';
import type { Principal } from '@/lib/auth/principal';
import { importAddresses, type AddressImportPreview } from '@/lib/services/address-import';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { createToken } from '@/lib/services/tokens';
import { originalsStore } from '@/lib/storage/originals-store';
import { POST as importRoute } from '@/app/api/projects/[projectId]/addresses/route';
import { GET as listRoute } from '@/app/api/projects/[projectId]/address-imports/route';
import { GET as originalRoute } from '@/app/api/address-imports/[importId]/original/route';
import { count, countFiles, makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf } from '../helpers/upload-form';

const STORAGE = path.resolve(__dirname, '../../.data/test-storage-addresses');
process.env.STORAGE_DIR = STORAGE;
const db = getDb();
let admin: Principal;
let engineer: Principal;
let surveyor: Principal;
let project: Project;

async function fresh(name: string): Promise<Project> {
  const partner = await registerPartner(db, admin, `Address owner ${Date.now()}`);
  return (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name, partnerOrganisation: partner }))).id))!;
}

async function send(p: Project, file: { name: string; bytes: Buffer | string }, fields: Record<string, string> = {}, who: Principal = engineer) {
  const form = await formOf([file], fields);
  try {
    return await importAddresses(db, who, p, form);
  } finally {
    await form.cleanup();
  }
}
async function preview(p: Project, file: { name: string; bytes: Buffer | string }, fields: Record<string, string> = {}): Promise<AddressImportPreview> {
  const r = await send(p, file, { ...fields, dryRun: 'true' });
  if (!r.dryRun) throw new Error('expected a preview');
  return r.preview;
}
async function confirm(p: Project, file: { name: string; bytes: Buffer | string }, fields: Record<string, string> = {}, who?: Principal) {
  const r = await send(p, file, fields, who);
  if (r.dryRun) throw new Error('expected an import');
  return r;
}
async function refusal(p: Promise<unknown>): Promise<AppError> {
  try {
    await p;
  } catch (e) {
    if (e instanceof AppError) return e;
    throw e;
  }
  throw new Error('expected a refusal');
}
const tables = async () => Promise.all(['addresses', 'address_streets', 'address_imports', 'address_history', 'audit_log'].map((t) => count(db, t)));

const csv = (lines: string[]) => ({ name: 'register.csv', bytes: lines.join('\n') + '\n' });
const HEADER = 'UPRN,Street,House No,Postcode,Town,Households,Lon,Lat';
// Quillhaven (fictional), placed near 9.2 E 52.2 N
const A = 'QH-1,Cobbler Walk,12a,QH1 4AB,Quillhaven,,9.20010,52.20010';
const B = 'QH-2,cobbler walk.,14,QH1 4AB,Quillhaven,3,9.20030,52.20012';
const C = 'QH-3,Lanternfield Rd,7-9,QH1 4AC,Quillhaven,2,9.20100,52.20040';

beforeAll(async () => {
  await rm(STORAGE, { recursive: true, force: true });
  admin = await makePrincipal(db, 'admin', 'contractor');
  engineer = await makePrincipal(db, 'engineer', 'contractor', admin.organisationName);
  surveyor = await makePrincipal(db, 'surveyor', 'contractor', admin.organisationName);
  project = await fresh('Address import');
});
afterAll(() => closeDb());

describe('importing the address register from a CSV with lon/lat', () => {
  it('previews with a guessed mapping and stores nothing', async () => {
    const before = [...(await tables()), await countFiles(STORAGE)];
    const p = await preview(project, csv([HEADER, A, B, C]));
    expect(p).toMatchObject({ format: 'csv', crs: 'EPSG:4326', rowCount: 3, errors: [], problems: [], partial: false });
    expect(p.mapping).toEqual({ key: 'UPRN', street: 'Street', number: 'House No', postcode: 'Postcode', locality: 'Town', units: 'Households', lon: 'Lon', lat: 'Lat' });
    expect(p.guessed.sort()).toEqual(['key', 'lat', 'locality', 'lon', 'number', 'postcode', 'street', 'units']);
    expect(p.counts).toEqual({ rows: 3, added: 3, changed: 0, removed: 0, restored: 0, unchanged: 0 });
    expect(p.rows[0]).toEqual({ row: 2, key: 'QH-1', lon: 9.2001, lat: 52.2001, street: 'Cobbler Walk', number: '12a', postcode: 'QH1 4AB', locality: 'Quillhaven', units: 1 });
    expect([...(await tables()), await countFiles(STORAGE)]).toEqual(before);
  });

  it('imports: addresses by key, one street per normalised name, numbers split, history, the original, one audit entry, a households run', async () => {
    const r = await confirm(project, csv([HEADER, A, B, C]));
    expect(r.counts).toEqual({ rows: 3, added: 3, changed: 0, removed: 0, restored: 0, unchanged: 0 });
    expect(r.import).toMatchObject({ format: 'csv', crs: 'EPSG:4326', partial: false, mappingGuessed: true, fileName: 'register.csv', importedBy: engineer.id });
    const list = await listAddresses(db, project.id);
    expect(list.map((a) => [a.key, a.street, a.number, a.units, a.lon, a.lat]).sort()).toEqual([
      ['QH-1', 'Cobbler Walk', '12a', 1, 9.2001, 52.2001],
      ['QH-2', 'cobbler walk.', '14', 3, 9.2003, 52.20012],
      ['QH-3', 'Lanternfield Rd', '7-9', 2, 9.201, 52.2004],
    ]);
    const rows = await db('addresses').where({ project_id: project.id }).orderBy('key').select('key', 'street_id', 'number_base', 'number_suffix', 'created_in_import');
    expect(rows.map((x) => [x.key, x.number_base, x.number_suffix, x.created_in_import])).toEqual([['QH-1', 12, 'a', r.import.id], ['QH-2', 14, '', r.import.id], ['QH-3', 7, '-9', r.import.id]]);
    expect(rows[0].street_id).toBe(rows[1].street_id);
    const streets = await db('address_streets').where({ project_id: project.id }).orderBy('name_norm').select('name', 'name_norm', 'locality');
    expect(streets).toEqual([{ name: 'Cobbler Walk', name_norm: 'cobbler walk', locality: 'Quillhaven' }, { name: 'Lanternfield Rd', name_norm: 'lanternfield road', locality: 'Quillhaven' }]);
    const history = await db('address_history').where({ project_id: project.id }).select('change', 'import_id', 'changed_by');
    expect(history).toHaveLength(3);
    expect(history.every((h) => h.change === 'added' && h.import_id === r.import.id && h.changed_by === engineer.id)).toBe(true);
    // the original, byte for byte, named by a committed row (so the orphan sweep keeps it)
    const imp = (await getAddressImport(db, r.import.id))!;
    expect(imp.storageKey).toMatch(new RegExp(`^addresses/${project.id}/${r.import.id}/`));
    expect((await committedOriginalKeys(db, [imp.storageKey])).has(imp.storageKey)).toBe(true);
    const chunks: Buffer[] = [];
    for await (const c of originalsStore().get(imp.storageKey)) chunks.push(c as Buffer);
    expect(Buffer.concat(chunks).toString('utf8')).toBe([HEADER, A, B, C].join('\n') + '\n');
    const audit = await db('audit_log').where({ project_id: project.id, object_type: 'address_import', object_id: r.import.id });
    expect(audit).toHaveLength(1);
    expect(describeAudit({ objectType: 'address_import', action: 'import', before: null, after: audit[0].after })).toBe(
      'Imported the address register from register.csv: 3 addresses; 3 added, 0 changed, 0 removed, 0 restored, 0 unchanged.',
    );
    const jobs = await db('jobs').where({ project_id: project.id, kind: 'households' }).select('status');
    expect(jobs.length).toBeGreaterThanOrEqual(1);
  });

  it('the same file again changes nothing: all unchanged, no history', async () => {
    const history = await count(db, 'address_history');
    const r = await confirm(project, csv([HEADER, A, B, C]));
    expect(r.counts).toEqual({ rows: 3, added: 0, changed: 0, removed: 0, restored: 0, unchanged: 3 });
    expect(await count(db, 'address_history')).toBe(history);
  });

  it('a re-import changes one, removes one, adds one; a later one restores the removed one, with history', async () => {
    const B2 = B.replace(',3,', ',4,').replace('9.20030', '9.20031');
    const D = 'QH-4,Saltmarsh Row,1,QH1 4AD,Quillhaven,1,9.20200,52.20100';
    const p = await preview(project, csv([HEADER, A, B2, D]));
    expect(p.counts).toEqual({ rows: 3, added: 1, changed: 1, removed: 1, restored: 0, unchanged: 1 });
    expect(p.changes).toEqual({
      added: ['QH-4'],
      changed: [{ key: 'QH-2', row: 3, fields: ['units', 'position'], before: { units: 3, position: [9.2003, 52.20012] }, after: { units: 4, position: [9.20031, 52.20012] } }],
      restored: [],
      removed: ['QH-3'],
    });
    const second = await confirm(project, csv([HEADER, A, B2, D]));
    expect(second.counts).toEqual(p.counts);
    const gone = (await getAddressByKey(db, project.id, 'QH-3'))!;
    expect(gone.removed).toBe(true);
    expect((await listAddresses(db, project.id)).map((a) => a.key).sort()).toEqual(['QH-1', 'QH-2', 'QH-4']);
    const h2 = await db('address_history as h').join('addresses as a', 'a.id', 'h.address_id').where('h.import_id', second.import.id).orderBy('a.key').select('a.key', 'h.change', 'h.before', 'h.after');
    expect(h2).toEqual([
      { key: 'QH-2', change: 'changed', before: { units: 3, position: [9.2003, 52.20012] }, after: { units: 4, position: [9.20031, 52.20012] } },
      { key: 'QH-3', change: 'removed', before: null, after: null },
      { key: 'QH-4', change: 'added', before: null, after: null },
    ]);
    expect((await db('addresses').where({ project_id: project.id, key: 'QH-3' }).first('removed_in_import')).removed_in_import).toBe(second.import.id);

    const C2 = C.replace('Lanternfield Rd', 'Lanternfield Road');
    const third = await confirm(project, csv([HEADER, A, B2, C2, D]));
    expect(third.counts).toEqual({ rows: 4, added: 0, changed: 0, removed: 0, restored: 1, unchanged: 3 });
    const back = (await getAddressByKey(db, project.id, 'QH-3'))!;
    expect([back.removed, back.street]).toEqual([false, 'Lanternfield Road']);
    const h3 = await db('address_history').where('import_id', third.import.id).select('change', 'before', 'after');
    expect(h3).toEqual([{ change: 'restored', before: { street: 'Lanternfield Rd' }, after: { street: 'Lanternfield Road' } }]);
    // "Lanternfield Road" is the same street as "Lanternfield Rd": still one row, under its first spelling
    expect((await db('address_streets').where({ project_id: project.id }).orderBy('name_norm').select('name')).map((x) => x.name)).toEqual(['Cobbler Walk', 'Lanternfield Rd', 'Saltmarsh Row']);
  });

  it('a partial import only adds and updates', async () => {
    const E = 'QH-5,Wickham Rise,2,QH1 4AE,Quillhaven,1,9.20300,52.20200';
    const r = await confirm(project, csv([HEADER, E]), { partial: 'true' });
    expect(r.counts).toEqual({ rows: 1, added: 1, changed: 0, removed: 0, restored: 0, unchanged: 0 });
    expect(r.import.partial).toBe(true);
    expect((await listAddresses(db, project.id)).map((a) => a.key).sort()).toEqual(['QH-1', 'QH-2', 'QH-3', 'QH-4', 'QH-5']);
    const audit = await db('audit_log').where({ object_id: r.import.id }).first('after');
    expect(describeAudit({ objectType: 'address_import', action: 'import', before: null, after: audit.after })).toMatch(/^Imported part of the address register \(added and updated only\)/);
  });

  it('connected flags: imported ones set connected from the import; a hand-recorded drop stays when a file says no', async () => {
    const p = await fresh('Connected flags');
    const head = 'key,lon,lat,connected';
    await confirm(p, csv([head, 'K1,9.2,52.2,yes', 'K2,9.2001,52.2,', 'K3,9.2002,52.2,no']));
    const state = async () => (await listAddresses(db, p.id)).map((a) => [a.key, a.connected, a.connectedSource]);
    expect(await state()).toEqual([['K1', true, 'import'], ['K2', false, null], ['K3', false, null]]);
    await db('addresses').where({ project_id: p.id, key: 'K3' }).update({ connected: true, connected_source: 'hand', connected_on: '2026-11-20' });
    const r = await confirm(p, csv([head, 'K1,9.2,52.2,no', 'K2,9.2001,52.2,x', 'K3,9.2002,52.2,no']));
    expect(r.counts).toMatchObject({ changed: 2, unchanged: 1 });
    expect(await state()).toEqual([['K1', false, null], ['K2', true, 'import'], ['K3', true, 'hand']]);
    // a file without the column leaves every flag as it is
    const again = await confirm(p, csv(['key,lon,lat', 'K1,9.2,52.2', 'K2,9.2001,52.2', 'K3,9.2002,52.2']));
    expect(again.counts).toMatchObject({ unchanged: 3 });
    expect(await state()).toEqual([['K1', false, null], ['K2', true, 'import'], ['K3', true, 'hand']]);
  });
});

describe('bad rows and bad files', () => {
  it('reports every bad row with its number and reason, and stores nothing (rows and files)', async () => {
    const p = await fresh('Bad rows');
    const file = csv([
      'key,street,number,units,side,connected,lon,lat',
      'B1,Cobbler Walk,1,1,route,yes,9.2,52.2',
      ',Cobbler Walk,2,1,,,9.2,52.2',
      'B1,Cobbler Walk,3,1,,,9.2,52.2',
      'B4,Cobbler Walk,4,1,,,,52.2',
      'B5,Cobbler Walk,5,1,,,9.2,91',
      'B6,Cobbler Walk,6,1.5,,,9.2,52.2',
      'B7,Cobbler Walk,7,1,left,,9.2,52.2',
      'B8,Cobbler Walk,8,1,,maybe,9.2,52.2',
      '',
      'B9,Cobbler Walk,9,1,,,9.2,52.2,extra',
    ]);
    const pv = await preview(p, file);
    const expected = [
      [3, "no key (column 'key' is empty)"],
      [4, "key 'B1' is also on row 2: a key may appear once in the file"],
      [5, "longitude ('lon') is empty"],
      [6, 'latitude 91 is beyond ±90'],
      [7, "units '1.5' is not a whole number of 1 or more"],
      [8, expect.stringMatching(/^side 'left' is not recognised; accepted: /)],
      [9, expect.stringMatching(/^connected 'maybe' is not recognised; accepted: /)],
      [11, 'the row has 9 cells, the header has 8'],
    ];
    expect(pv.errors.map((e) => [e.row, e.message])).toEqual(expected);
    expect(pv.counts).toMatchObject({ rows: 9, added: 1 });

    const before = [...(await tables()), await countFiles(STORAGE)];
    const err = await refusal(send(p, file));
    expect([err.code, err.status]).toEqual(['invalid', 422]);
    expect(err.message).toMatch(/^8 rows of the file cannot be imported, so nothing was stored: row 3: no key/);
    expect((err.details as { row: number; message: string }[]).map((e) => [e.row, e.message])).toEqual(expected);
    expect([...(await tables()), await countFiles(STORAGE)]).toEqual(before);
    expect(await listAddressImports(db, p.id)).toEqual([]);
  });

  it('refuses a file of lines, an empty file, an unknown format, a mapping naming a column that is not there, x/y without a crs', async () => {
    const p = await fresh('Bad files');
    const lines = JSON.stringify({ type: 'FeatureCollection', features: [{ type: 'Feature', properties: { key: 'L1' }, geometry: { type: 'LineString', coordinates: [[9.2, 52.2], [9.21, 52.2]] } }] });
    const l = await refusal(send(p, { name: 'lines.geojson', bytes: lines }));
    expect([l.code, l.message]).toEqual(['unsupported_format', 'the GeoJSON holds LineString features and no points; an address register is one point per address']);
    expect((await refusal(send(p, { name: 'empty.csv', bytes: '' }))).code).toBe('empty_file');
    expect((await refusal(send(p, { name: 'header.csv', bytes: 'key,lon,lat\n' }))).message).toMatch(/is a CSV with a header but no rows/);
    const unknown = await refusal(send(p, { name: 'notes.txt', bytes: 'just some words\n' }));
    expect(unknown.code).toBe('unknown_format');
    const mapped = await refusal(send(p, csv(['key,lon,lat', 'M1,9.2,52.2']), { mapping: JSON.stringify({ key: 'UPRN', lon: 'lon', lat: 'lat' }) }));
    expect([mapped.code, mapped.message]).toEqual(['invalid', "The file has no column 'UPRN'; it has 'key', 'lon', 'lat'."]);
    const noCrs = await refusal(send(p, csv(['key,easting,northing', 'M1,451234.5,206789.2'])));
    expect(noCrs.code).toBe('crs_required');
    const pv = await preview(p, csv(['key,easting,northing', 'M1,451234.5,206789.2']));
    expect(pv.problems.map((x) => x.path)).toEqual(['crs']);
    expect(pv.mapping).toEqual({ key: 'key', x: 'easting', y: 'northing' });
    expect(await listAddressImports(db, p.id)).toEqual([]);
  });
});

describe('projected coordinates, GeoJSON and shapefiles', () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp(path.join(os.tmpdir(), 'address-import-'));
  });
  afterAll(() => rm(dir, { recursive: true, force: true }));

  it('reprojects a CSV in EPSG:27700 to the positions GDAL gives', async () => {
    const p = await fresh('British grid');
    const grid: [string, number, number][] = [['G1', 451234.5, 206789.2], ['G2', 451300.25, 206850.75], ['G3', 530034.0, 180381.0]];
    // expected WGS 84 positions from GDAL's gdaltransform [computed with GDAL 3 (PROJ), EPSG:27700 → EPSG:4326]
    const out = execFileSync('gdaltransform', ['-s_srs', 'EPSG:27700', '-t_srs', 'EPSG:4326', '-output_xy'], { input: grid.map(([, x, y]) => `${x} ${y}`).join('\n') + '\n', encoding: 'utf8' });
    const expected = out.trim().split('\n').map((l) => l.trim().split(/\s+/).map(Number));
    const file = csv(['ref,easting,northing,street,no', ...grid.map(([k, x, y], i) => `${k},${x},${y},Mill St.,${i + 1}`)]);
    const r = await confirm(p, file, { crs: '27700', mapping: JSON.stringify({ key: 'ref', x: 'easting', y: 'northing', street: 'street', number: 'no' }) });
    expect(r.import.crs).toBe('EPSG:27700');
    expect(r.import.mappingGuessed).toBe(false);
    const list = await listAddresses(db, p.id);
    for (const [i, [k]] of grid.entries()) {
      const a = list.find((x) => x.key === k)!;
      // the catalogue's shift is the 7-parameter one GDAL also uses without the OSTN15 grid: a few millimetres apart at most
      expect(Math.abs(a.lon - expected[i][0])).toBeLessThan(1e-7);
      expect(Math.abs(a.lat - expected[i][1])).toBeLessThan(1e-7);
    }
    expect(r.import.warnings.join(' ')).toMatch(/EPSG:27700.*datum shift approximate/);
    const off = await preview(p, csv(['ref,easting,northing', 'F1,451234.5,206789.2', 'F2,99999999,206789.2']), { crs: 'EPSG:27700' });
    expect(off.errors).toEqual([{ row: 3, key: 'F2', message: 'easting 99999999, northing 206789.2 lies outside the area of EPSG:27700 (OSGB 1936 / British National Grid)' }]);
  });

  it('imports GeoJSON points, properties as the columns, row numbers the feature\'s place in the file', async () => {
    const p = await fresh('GeoJSON');
    const f = (key: string, coords: number[] | null, props: Record<string, unknown> = {}) => ({ type: 'Feature', properties: { address_id: key, street_name: 'Cobbler Walk', housenumber: key.slice(1), ...props }, geometry: coords && { type: 'Point', coordinates: coords } });
    const bad = { type: 'FeatureCollection', features: [f('J1', [9.2, 52.2]), f('J2', null), f('J3', [9.2, 52.2], { units: 'two' })] };
    const pv = await preview(p, { name: 'register.geojson', bytes: JSON.stringify(bad) });
    expect(pv).toMatchObject({ format: 'geojson', crs: 'EPSG:4326' });
    expect(pv.mapping).toEqual({ key: 'address_id', street: 'street_name', number: 'housenumber', units: 'units' });
    expect(pv.errors.map((e) => [e.row, e.message])).toEqual([[2, 'the feature is without a geometry, not a point'], [3, "units 'two' is not a whole number of 1 or more"]]);
    const good = { type: 'FeatureCollection', features: [f('J1', [9.2, 52.2], { units: 2 }), f('J2', [9.2002, 52.2001], { units: null })] };
    const r = await confirm(p, { name: 'register.geojson', bytes: JSON.stringify(good) });
    expect(r.counts).toMatchObject({ added: 2 });
    expect((await listAddresses(db, p.id)).map((a) => [a.key, a.number, a.units, a.lon, a.lat])).toEqual([['J1', '1', 2, 9.2, 52.2], ['J2', '2', 1, 9.2002, 52.2001]]);
  });

  it('imports a zipped shapefile of points made by ogr2ogr, in EPSG:27700 from its .prj', async () => {
    const p = await fresh('Shapefile');
    const pts: [string, string, string, number, number][] = [['S1', 'Wickham Rise', '4', -1.2591, 51.7574], ['S2', 'Wickham Rise', '6', -1.2589, 51.75745], ['S3', 'Saltmarsh Row', '1', -1.2580, 51.7580]];
    const geojson = { type: 'FeatureCollection', features: pts.map(([k, s, n, lon, lat]) => ({ type: 'Feature', properties: { UPRN: k, STREET: s, HOUSE_NO: n, UNITS: 1 }, geometry: { type: 'Point', coordinates: [lon, lat] } })) };
    await writeFile(path.join(dir, 'points.geojson'), JSON.stringify(geojson));
    // GDAL writes the shapefile, projected to the British National Grid, and zips it (.shp.zip) [computed with GDAL]
    execFileSync('ogr2ogr', ['-f', 'ESRI Shapefile', '-s_srs', 'EPSG:4326', '-t_srs', 'EPSG:27700', path.join(dir, 'addresses.shp.zip'), path.join(dir, 'points.geojson')]);
    const bytes = await readFile(path.join(dir, 'addresses.shp.zip'));
    const r = await confirm(p, { name: 'addresses.zip', bytes });
    expect(r.import).toMatchObject({ format: 'shapefile', crs: 'EPSG:27700', mapping: { key: 'UPRN', street: 'STREET', number: 'HOUSE_NO', units: 'UNITS' } });
    const list = await listAddresses(db, p.id);
    for (const [k, s, n, lon, lat] of pts) {
      const a = list.find((x) => x.key === k)!;
      expect([a.street, a.number]).toEqual([s, n]);
      // GDAL's forward projection read back with the catalogue's definition: within a millimetre or so
      expect(Math.abs(a.lon - lon)).toBeLessThan(1e-7);
      expect(Math.abs(a.lat - lat)).toBeLessThan(1e-7);
    }
    // the row number of a shapefile is the record's place in the file
    const moved = await preview(p, { name: 'addresses.zip', bytes }, { mapping: JSON.stringify({ key: 'STREET' }) });
    expect(moved.errors.map((e) => [e.row, e.message])).toEqual([[2, "key 'Wickham Rise' is also on row 1: a key may appear once in the file"]]);
  });
});

describe('the routes', () => {
  const req = (method: string, url: string, token: string, body?: BodyInit) => new NextRequest(`http://127.0.0.1${url}`, { method, headers: { authorization: `Bearer ${token}` }, body });
  const params = (p: Record<string, string>) => ({ params: Promise.resolve(p) });
  const form = (text: string, fields: Record<string, string> = {}) => {
    const f = new FormData();
    for (const [k, v] of Object.entries(fields)) f.set(k, v);
    f.set('file', new Blob([text], { type: 'text/csv' }), 'register.csv');
    return f;
  };

  it('the owner\'s admin imports (201), a surveyor may not (403); previews answer 200; the list and the original', async () => {
    const p = await fresh('Routes');
    const ownerOrg = (await db('projects as x').join('organisations as o', 'o.id', 'x.owner_org_id').where('x.id', p.id).first('o.name')).name;
    const theOwnerAdmin = await makePrincipal(db, 'admin', 'owner', ownerOrg);
    const adminToken = (await createToken(db, theOwnerAdmin, { name: 'addresses' })).secret;
    const surveyorToken = (await createToken(db, surveyor, { name: 'addresses' })).secret;
    const base = `/api/projects/${p.id}/addresses`;
    const text = 'key,lon,lat\nR1,9.2,52.2\n';
    expect((await importRoute(req('POST', base, surveyorToken, form(text)), params({ projectId: p.id }))).status).toBe(403);
    const dry = await importRoute(req('POST', base, adminToken, form(text, { dryRun: 'true' })), params({ projectId: p.id }));
    expect(dry.status).toBe(200);
    expect(((await dry.json()) as { preview: { counts: { added: number } } }).preview.counts.added).toBe(1);
    const made = await importRoute(req('POST', base, adminToken, form(text)), params({ projectId: p.id }));
    expect(made.status).toBe(201);
    const body = (await made.json()) as { import: { id: string }; counts: { added: number } };
    expect(body.counts.added).toBe(1);
    const bad = await importRoute(req('POST', base, adminToken, form('key,lon,lat\nR1,9.2,52.2\nR1,9.2,52.2\n')), params({ projectId: p.id }));
    expect(bad.status).toBe(422);
    expect(((await bad.json()) as { error: { details: unknown } }).error.details).toEqual([{ row: 3, key: 'R1', message: "key 'R1' is also on row 2: a key may appear once in the file" }]);

    const list = await listRoute(req('GET', `/api/projects/${p.id}/address-imports`, surveyorToken), params({ projectId: p.id }));
    expect(((await list.json()) as { imports: { id: string; importedByName: string }[] }).imports.map((i) => i.id)).toEqual([body.import.id]);
    const original = await originalRoute(req('GET', `/api/address-imports/${body.import.id}/original`, surveyorToken), params({ importId: body.import.id }));
    expect(original.status).toBe(200);
    expect(await original.text()).toBe(text);
    // another organisation's person does not see it
    const stranger = await makePrincipal(db, 'admin', 'owner');
    const strangerToken = (await createToken(db, stranger, { name: 'x' })).secret;
    expect((await originalRoute(req('GET', `/api/address-imports/${body.import.id}/original`, strangerToken), params({ importId: body.import.id }))).status).toBe(404);
  });
});
