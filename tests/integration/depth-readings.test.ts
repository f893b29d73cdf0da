import { execFileSync } from 'node:child_process';
import { mkdtemp, readFile, readdir, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import geodesic from 'geographiclib-geodesic';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { listDepthReadings, listDepthReadingsOnSection } from '@/db/depth-readings';
import { getProject, type Project } from '@/db/projects';
import { listAnchorRoutes } from '@/db/record-anchors';
import { AppError } from '@/lib/api/errors';
import type { Principal } from '@/lib/auth/principal';
import { depthFindings, depthReadingChainages } from '@/lib/services/checks/depths';
import {
  createDepthReading, depthFromUploadSchema, depthReadingPatchSchema, depthReadingSchema, depthReadingsFromUpload, editDepthReading, importDepthCsv, removeDepthReading,
} from '@/lib/services/depth-readings';
import { importPlan } from '@/lib/services/planned';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { receiveUpload } from '@/lib/services/uploads';
import { count, makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf } from '../helpers/upload-form';

// Depth readings: typed, imported from a CSV (preview, confirm, failing rows, nothing half-stored) and taken
// from a shapefile's attribute (the shapefile written by GDAL's ogr2ogr from a GeoJSON). Positions are drawn
// with GeographicLib's direct problem [GeographicLib], so chainages along the routes are known exactly.
process.env.STORAGE_DIR = path.resolve(__dirname, '../../.data/test-storage-depths');
const G = geodesic.Geodesic.WGS84;
const db = getDb();
const ORIGIN: [number, number] = [9.141, 52.121];
const at = (azi: number, s: number, left = 0, from = ORIGIN): [number, number] => {
  const p = G.Direct(from[1], from[0], azi, s);
  if (!left) return [p.lon2!, p.lat2!];
  const q = G.Direct(p.lat2!, p.lon2!, p.azi2! - 90, left);
  return [q.lon2!, q.lat2!];
};
const design = JSON.stringify({
  type: 'FeatureCollection',
  features: [
    { type: 'Feature', properties: { route_id: 'D-1', street: 'Gauge Lane', type: 'street' }, geometry: { type: 'LineString', coordinates: [at(90, 0), at(90, 200)] } },
    { type: 'Feature', properties: { route_id: 'D-2', street: 'Plumb Row', type: 'street' }, geometry: { type: 'LineString', coordinates: [at(0, 0), at(0, 120)] } },
  ],
});

let surveyor: Principal;
let engineer: Principal;
let owner: Principal;
let other: Principal;
let project: Project;
let otherProject: Project;
let d1: string;
let d2: string;

const create = (who: Principal, input: unknown, p = project) => createDepthReading(db, who, p, depthReadingSchema.parse(input));
const refusedParse = (input: unknown) => {
  const r = depthReadingSchema.safeParse(input);
  expect(r.success).toBe(false);
  return r.error!.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
};
async function csvImport(text: string, fields: Record<string, string>, preview: boolean) {
  const form = await formOf([{ name: 'depths.csv', bytes: text }], fields);
  try {
    return await importDepthCsv(db, surveyor, project, form, { preview });
  } finally {
    await form.cleanup();
  }
}

beforeAll(async () => {
  const admin = await makePrincipal(db, 'admin', 'contractor');
  engineer = await makePrincipal(db, 'engineer', 'contractor', admin.organisationName);
  surveyor = await makePrincipal(db, 'surveyor', 'contractor', admin.organisationName);
  const ownerOrg = await registerPartner(db, admin, `Depth owner ${Date.now()}`);
  owner = await makePrincipal(db, 'engineer', 'owner', ownerOrg);
  project = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: 'Depths', partnerOrganisation: ownerOrg, minCoverDepthM: 0.4, timeZone: 'Europe/Berlin' }))).id))!;
  const form = await formOf([{ name: 'design.geojson', bytes: design }]);
  await importPlan(db, engineer, project, form);
  await form.cleanup();
  const routes = await listAnchorRoutes(db, project.id);
  d1 = routes.find((r) => r.ref === 'D-1')!.id;
  d2 = routes.find((r) => r.ref === 'D-2')!.id;
  const otherAdmin = await makePrincipal(db, 'admin', 'contractor');
  other = await makePrincipal(db, 'surveyor', 'contractor', otherAdmin.organisationName);
  otherProject = (await getProject(db, (await createProject(db, otherAdmin, createProjectSchema.parse({ name: 'Other depths', partnerOrganisation: await registerPartner(db, otherAdmin, `Other owner ${Date.now()}`) }))).id))!;
});
afterAll(() => closeDb());

describe('typed depth readings', () => {
  it('stores a reading at a chainage, on the route there, with an audit entry', async () => {
    const before = await count(db, 'audit_log');
    const r = await create(surveyor, { routeId: d1, chainageM: 50, coverM: 0.45, trenchDepthM: 0.5, measuredAt: '2026-11-03T10:15', note: 'by the lamp post' });
    expect(r.routeRef).toBe('D-1');
    expect(r.chainageM).toBe(50);
    expect(r.offsetM).toBe(0);
    expect(r.source).toBe('typed');
    // 10:15 in Berlin in November (CET, UTC+1) is 09:15 UTC
    expect(r.measuredAt).toBe('2026-11-03T09:15:00.000Z');
    const [lon, lat] = at(90, 50);
    expect(r.lon).toBeCloseTo(lon, 7);
    expect(r.lat).toBeCloseTo(lat, 7);
    expect(await count(db, 'audit_log')).toBe(before + 1);
    const entry = await db('audit_log').where({ object_id: r.id, action: 'create' }).first();
    expect(entry.object_type).toBe('depth_reading');
    expect(entry.after).toMatchObject({ routeRef: 'D-1', coverM: 0.45 });
  });

  it('snaps a GNSS position to the nearest route with chainage and signed offset', async () => {
    const r = await create(surveyor, { lon: at(0, 80, -1.5)[0], lat: at(0, 80, -1.5)[1], coverM: 0.36 });
    expect(r.routeRef).toBe('D-2');
    expect(r.chainageM).toBeCloseTo(80, 1);
    expect(r.offsetM).toBeCloseTo(-1.5, 1);
    expect(r.trenchDepthM).toBeNull();
  });

  it('refuses each bad field with its message, storing nothing', async () => {
    const rows = await count(db, 'depth_readings');
    expect(refusedParse({ routeId: d1, chainageM: 10 })).toContain('coverM: Give the cover, the trench depth or both.');
    expect(refusedParse({ routeId: d1, chainageM: 10, coverM: 45 })).toContain('coverM: The cover must be at most 5 m: depths are in metres.');
    expect(refusedParse({ routeId: d1, chainageM: 10, coverM: -0.1 })).toContain('coverM: The cover must be at least 0 m.');
    expect(refusedParse({ routeId: d1, chainageM: 10, trenchDepthM: 0 })).toContain('trenchDepthM: The trench depth must be at least 0.01 m.');
    expect(refusedParse({ routeId: d1, chainageM: 10, coverM: 0.6, trenchDepthM: 0.5 })).toContain('coverM: The cover cannot be more than the trench depth.');
    expect(refusedParse({ routeId: d1, chainageM: 10, coverM: 0.4, measuredAt: 'yesterday' })).toContain('measuredAt: Give the time as YYYY-MM-DD HH:MM.');
    expect(refusedParse({ routeId: d1, chainageM: 10, coverM: 'deep' }).join()).toMatch(/coverM: The cover must be a number of metres/);
    const beyond = await create(surveyor, { routeId: d1, chainageM: 250, coverM: 0.4 }).catch((e) => e);
    expect(beyond).toBeInstanceOf(AppError);
    expect(beyond.message).toMatch(/Route D-1 is 200\.0 m long: chainage 250 m is beyond its end/);
    const far = await create(surveyor, { lon: at(180, 400)[0], lat: at(180, 400)[1], coverM: 0.4 }).catch((e) => e);
    expect(far.message).toMatch(/more than 100 m/);
    const foreignRoute = await create(surveyor, { routeId: d1, chainageM: 10, coverM: 0.4 }, { ...otherProject, contractorOrgId: surveyor.organisationId }).catch((e) => e);
    expect(foreignRoute.message).toBe('That route is not in this project.');
    const impossible = await create(surveyor, { routeId: d1, chainageM: 10, coverM: 0.4, measuredAt: '2026-02-30T10:00' }).catch((e) => e);
    expect(impossible.message).toBe('That date and time does not exist.');
    expect(await count(db, 'depth_readings')).toBe(rows);
  });

  it('edits a reading (moving it along its route) and deletes one, each audited', async () => {
    const r = await create(engineer, { routeId: d1, chainageM: 120, coverM: 0.5 });
    const moved = await editDepthReading(db, surveyor, project, r.id, depthReadingPatchSchema.parse({ chainageM: 130, coverM: 0.38 }));
    expect(moved.chainageM).toBe(130);
    expect(moved.coverM).toBe(0.38);
    expect(moved.routeId).toBe(d1);
    const upd = await db('audit_log').where({ object_id: r.id, action: 'update' }).first();
    expect(upd.before).toMatchObject({ chainageM: 120, coverM: 0.5 });
    expect(upd.after).toMatchObject({ chainageM: 130, coverM: 0.38 });
    const cleared = await editDepthReading(db, surveyor, project, r.id, { coverM: null }).catch((e) => e);
    expect(cleared.message).toBe('Give the cover, the trench depth or both.');
    await removeDepthReading(db, surveyor, project, r.id);
    expect(await db('depth_readings').where({ id: r.id }).first()).toBeUndefined();
    expect(await db('audit_log').where({ object_id: r.id, action: 'delete' }).first()).toBeDefined();
  });

  it('lets the contractor\'s surveyors and engineers write, not the owner\'s people, and hides other projects\' readings', async () => {
    const err = await create(owner, { routeId: d1, chainageM: 10, coverM: 0.4 }).catch((e) => e);
    expect(err.code).toBe('forbidden');
    const theirs = await create(other, { routeId: (await listAnchorRoutes(db, otherProject.id))[0]?.id ?? d1, chainageM: 1, coverM: 0.4 }, otherProject).catch((e) => e);
    // the other project has no plan: nothing to place on, and none of this project's routes
    expect(theirs).toBeInstanceOf(AppError);
    const mine = (await listDepthReadings(db, project.id))[0];
    const foreign = await editDepthReading(db, other, otherProject, mine.id, { coverM: 0.5 }).catch((e) => e);
    expect(foreign.code).toBe('not_found');
    const gone = await removeDepthReading(db, other, otherProject, mine.id).catch((e) => e);
    expect(gone.code).toBe('not_found');
  });
});

describe('depth readings from a CSV', () => {
  const good = ['Route;Chainage;Cover;Trench depth;Time', 'D-1;20;0,42;0,50;2026-11-04 09:00', 'D-1;40;0,38;0,48;2026-11-04 09:05', 'D-2;60;0,44;;2026-11-04 09:10'].join('\n') + '\n';

  it('previews the guessed mapping and the readings without storing anything', async () => {
    const rows = await count(db, 'depth_readings');
    const p = await csvImport(good, {}, true);
    expect(p.columns.guessed).toBe(true);
    expect(p.columns.map).toEqual({ route: 'Route', chainage: 'Chainage', cover: 'Cover', depth: 'Trench depth', time: 'Time' });
    expect(p.placement).toBe('chainage');
    expect(p.rowCount).toBe(3);
    expect(p.readyCount).toBe(3);
    expect(p.problems).toEqual([]);
    expect(p.sample.map((s) => [s.row, s.routeRef, s.chainageM, s.coverM, s.compliance])).toEqual([
      [2, 'D-1', 20, 0.42, 'pass'],
      [3, 'D-1', 40, 0.38, 'fail'],
      [4, 'D-2', 60, 0.44, 'pass'],
    ]);
    expect(p.stored).toBeUndefined();
    expect(await count(db, 'depth_readings')).toBe(rows);
  });

  it('without confirm it only previews, even when not asked for a preview', async () => {
    const rows = await count(db, 'depth_readings');
    await csvImport(good, {}, false);
    expect(await count(db, 'depth_readings')).toBe(rows);
  });

  it('lists each failing row with its row number and reason, and a confirmed file with any stores nothing', async () => {
    const bad = [
      'route,chainage,cover,depth,time',
      'D-1,10,0.45,0.5,2026-11-04 08:00', // 2: fine
      'D-9,10,0.45,0.5,2026-11-04 08:00', // 3: no such route
      'D-1,abc,0.45,0.5,', // 4: chainage not a number
      'D-1,30,,,', // 5: no depth
      'D-1,35,450,,', // 6: millimetres typed as metres
      'D-1,250,0.4,,', // 7: beyond the route's end
      'D-1,50,0.4,0.5,2026-02-30 10:00', // 8: no such day
      'D-1,60,0.4', // 9: short row
      'D-2,70,0.6,0.5,', // 10: cover deeper than the trench
    ].join('\n') + '\n';
    const rows = await count(db, 'depth_readings');
    const audit = await count(db, 'audit_log');
    const p = await csvImport(bad, {}, true);
    expect(p.readyCount).toBe(1);
    expect(p.problems.map((x) => x.row)).toEqual([3, 4, 5, 6, 7, 8, 9, 10]);
    const why = Object.fromEntries(p.problems.map((x) => [x.row, x.message]));
    expect(why[3]).toBe('row 3: there is no route D-9 in this project');
    expect(why[4]).toBe("row 4: chainage 'abc' is not a number");
    expect(why[5]).toBe('row 5: neither cover nor trench depth is given');
    expect(why[6]).toBe('row 6: cover 450 m is outside 0–5 m (depths are in metres)');
    expect(why[7]).toMatch(/^row 7: Route D-1 is 200\.0 m long: chainage 250 m is beyond its end/);
    expect(why[8]).toBe("row 8: time '2026-02-30 10:00' names a day or time that does not exist (February 2026 has 28 days)");
    expect(why[9]).toBe('row 9 has 3 columns, the header has 5');
    expect(why[10]).toBe('row 10: cover 0.6 m is more than the trench depth 0.5 m');
    const err = await csvImport(bad, { confirm: '1' }, false).catch((e) => e);
    expect(err).toBeInstanceOf(AppError);
    expect(err.code).toBe('invalid');
    expect(err.message).toMatch(/^8 rows cannot be stored \(rows 3, 4, 5, 6, 7, 8, 9, 10\); nothing was stored/);
    expect(err.details.map((d: { row: number }) => d.row)).toEqual([3, 4, 5, 6, 7, 8, 9, 10]);
    expect(await count(db, 'depth_readings')).toBe(rows);
    expect(await count(db, 'audit_log')).toBe(audit);
  });

  it('confirmed, stores every reading in one go with one audit entry', async () => {
    const rows = await count(db, 'depth_readings');
    const r = await csvImport(good, { confirm: '1' }, false);
    expect(r.stored).toBe(3);
    expect(await count(db, 'depth_readings')).toBe(rows + 3);
    const stored = (await listDepthReadings(db, project.id)).filter((x) => x.source === 'csv');
    expect(stored.map((x) => [x.sourceRow, x.routeRef, x.chainageM, x.coverM, x.trenchDepthM])).toEqual([
      [2, 'D-1', 20, 0.42, 0.5],
      [3, 'D-1', 40, 0.38, 0.48],
      [4, 'D-2', 60, 0.44, null],
    ]);
    // 09:00 on the project's clock (Berlin, CET) is 08:00 UTC
    expect(stored[0].measuredAt).toBe('2026-11-04T08:00:00.000Z');
    const entry = await db('audit_log').where({ project_id: project.id, object_type: 'depth_reading', action: 'import' }).first();
    expect(entry.after).toMatchObject({ fileName: 'depths.csv', count: 3, belowMinimum: 1 });
  });

  it('places easting/northing rows in a given grid, and asks for the grid when none is given', async () => {
    // UTM 32N coordinates of two points on D-2, from PROJ through proj4js's definition in the PostGIS catalogue
    const { default: proj4 } = await import('proj4');
    const utm = '+proj=utm +zone=32 +datum=WGS84 +units=m +no_defs';
    const en = (p: [number, number]) => proj4('EPSG:4326', utm, p).map((v: number) => v.toFixed(3));
    const text = `E,N,Cover\n${en(at(0, 30)).join(',')},0.5\n${en(at(0, 90, 0.8)).join(',')},0.41\n`;
    const asked = await csvImport(text, {}, true).catch((e) => e);
    expect(asked.code).toBe('crs_required');
    expect(asked.details.columns.map).toMatchObject({ x: 'E', y: 'N', cover: 'Cover' });
    const p = await csvImport(text, { crs: '32632' }, true);
    expect(p.crs).toBe('EPSG:32632');
    expect(p.problems).toEqual([]);
    expect(p.sample.map((s) => [s.routeRef, Math.round(s.chainageM * 10) / 10, Math.round(s.offsetM * 10) / 10])).toEqual([
      ['D-2', 30, 0],
      ['D-2', 90, 0.8],
    ]);
  });

  it('takes a mapping the person chose, and refuses a column not in the header', async () => {
    const text = 'lng,lat,dc,td\n' + `${at(90, 150).join(',')},0.55,0.6\n`;
    const p = await csvImport(text, { columns: JSON.stringify({ lon: 'lng', lat: 'lat', cover: 'dc', depth: 'td' }) }, true);
    expect(p.columns.guessed).toBe(false);
    expect(p.sample[0].routeRef).toBe('D-1');
    expect(p.sample[0].chainageM).toBeCloseTo(150, 1);
    const err = await csvImport(text, { columns: JSON.stringify({ lon: 'lng', lat: 'lat', cover: 'Cover' }) }, true).catch((e) => e);
    expect(err.message).toMatch(/column 'Cover' given for cover is not in the CSV header/);
    const none = await csvImport('a,b\n1,2\n', {}, true).catch((e) => e);
    expect(none.message).toMatch(/no placement columns were found/);
  });

  it('refuses the owner\'s people', async () => {
    const form = await formOf([{ name: 'd.csv', bytes: good }], { confirm: '1' });
    const err = await importDepthCsv(db, owner, project, form, { preview: false }).catch((e) => e);
    await form.cleanup();
    expect(err.code).toBe('forbidden');
  });
});

describe('depth readings from an upload attribute', () => {
  it('takes the cover from a shapefile attribute (written by GDAL ogr2ogr), once', async () => {
    const dir = await mkdtemp(path.join(os.tmpdir(), 'depth-shp-'));
    try {
      const points = [[25, 0.47], [45, 0.33], [65, null], [85, 0.52]] as const;
      const gj = {
        type: 'FeatureCollection',
        features: points.map(([s, d], i) => ({ type: 'Feature', properties: { name: `P${i + 1}`, depth: d }, geometry: { type: 'Point', coordinates: at(90, s, 0.3) } })),
      };
      await writeFile(path.join(dir, 'shots.geojson'), JSON.stringify(gj));
      // [GDAL] the ESRI Shapefile driver writes .shp, .shx, .dbf and a .prj for WGS 84
      execFileSync('ogr2ogr', ['-f', 'ESRI Shapefile', path.join(dir, 'shots.shp'), path.join(dir, 'shots.geojson')]);
      const parts = (await readdir(dir)).filter((f) => f.startsWith('shots.') && !f.endsWith('.geojson'));
      expect(parts.sort()).toEqual(expect.arrayContaining(['shots.dbf', 'shots.prj', 'shots.shp', 'shots.shx']));
      const form = await formOf(await Promise.all(parts.map(async (f) => ({ name: f, bytes: await readFile(path.join(dir, f)) }))), { content: 'depth_shots' });
      const { upload } = await receiveUpload(db, surveyor, project, form);
      await form.cleanup();
      expect(upload.status).toBe('stored');
      const rows = await count(db, 'depth_readings');
      const missing = await depthReadingsFromUpload(db, surveyor, project, upload.id, depthFromUploadSchema.parse({ attribute: 'cover' })).catch((e) => e);
      expect(missing.message).toBe("No point of this upload carries an attribute named 'cover'.");
      const out = await depthReadingsFromUpload(db, surveyor, project, upload.id, depthFromUploadSchema.parse({ attribute: 'depth' }));
      expect(out.stored).toBe(3);
      expect(await count(db, 'depth_readings')).toBe(rows + 3);
      expect(out.readings.map((r) => [r.routeRef, Math.round(r.chainageM), r.coverM, r.source, r.sourceRow, r.uploadId])).toEqual([
        ['D-1', 25, 0.47, 'upload', 1, upload.id],
        ['D-1', 45, 0.33, 'upload', 2, upload.id],
        ['D-1', 85, 0.52, 'upload', 4, upload.id],
      ]);
      expect(out.readings[0].offsetM).toBeCloseTo(0.3, 2);
      const again = await depthReadingsFromUpload(db, surveyor, project, upload.id, depthFromUploadSchema.parse({ attribute: 'depth' })).catch((e) => e);
      expect(again.code).toBe('conflict');
      expect(await count(db, 'depth_readings')).toBe(rows + 3);
      const audit = await db('audit_log').where({ object_id: upload.id, action: 'import_upload' }).first();
      expect(audit.after).toMatchObject({ attribute: 'depth', count: 3 });
    } finally {
      await rm(dir, { recursive: true, force: true });
    }
  });

  it('takes the depth column of a survey CSV offered in its column mapping, from points and line vertices', async () => {
    const ll = (s: number) => at(0, s).slice().reverse().join(',');
    const csv = ['pt,lat,lon,cover,line', `1,${ll(92)},0.45,L1`, `2,${ll(96)},0.39,L1`, `3,${ll(104)},0.5,`, `4,${ll(108)},,`].join('\n') + '\n';
    const form = await formOf([{ name: 'shots-with-cover.csv', bytes: csv }], { surveyDate: '2026-11-04' });
    const { upload } = await receiveUpload(db, surveyor, project, form);
    await form.cleanup();
    expect((upload.columns as { map: Record<string, string> }).map.depth).toBe('cover');
    const out = await depthReadingsFromUpload(db, surveyor, project, upload.id, depthFromUploadSchema.parse({ attribute: 'depth' }));
    expect(out.readings.map((r) => [r.routeRef, Math.round(r.chainageM), r.coverM, r.sourceVertex])).toEqual([
      ['D-2', 92, 0.45, 1],
      ['D-2', 96, 0.39, 2],
      ['D-2', 104, 0.5, null],
    ]);
    expect(out.readings[2].sourceRow).toBe(4);
  });

  it('refuses the whole upload when a value is not a depth, storing nothing', async () => {
    const gj = { type: 'FeatureCollection', features: [
      { type: 'Feature', properties: { cover_m: 0.4 }, geometry: { type: 'Point', coordinates: at(0, 20) } },
      { type: 'Feature', properties: { cover_m: 'n/a' }, geometry: { type: 'Point', coordinates: at(0, 40) } },
      { type: 'Feature', properties: { cover_m: 420 }, geometry: { type: 'Point', coordinates: at(0, 60) } },
    ] };
    const form = await formOf([{ name: 'covers.geojson', bytes: JSON.stringify(gj) }]);
    const { upload } = await receiveUpload(db, surveyor, project, form);
    await form.cleanup();
    const rows = await count(db, 'depth_readings');
    const err = await depthReadingsFromUpload(db, surveyor, project, upload.id, depthFromUploadSchema.parse({ attribute: 'cover_m' })).catch((e) => e);
    expect(err.code).toBe('invalid');
    expect(err.details.map((d: { path: string }) => d.path)).toEqual(['feature 2', 'feature 3']);
    expect(err.message).toMatch(/feature 2: cover_m 'n\/a' is not a depth in metres/);
    expect(await count(db, 'depth_readings')).toBe(rows);
  });
});

describe('depth checks and the section view', () => {
  it('finds every reading below the minimum cover, and lists the chainages for the coverage check', async () => {
    const findings = await depthFindings(db, project);
    const all = await listDepthReadings(db, project.id);
    const below = all.filter((r) => r.coverM !== null && r.coverM < 0.4);
    expect(below.length).toBeGreaterThanOrEqual(3);
    expect(findings.map((f) => f.recordId).sort()).toEqual(below.map((r) => r.id).sort());
    const f = findings.find((x) => x.recordId === below.find((r) => r.coverM === 0.33)!.id)!;
    expect(f).toMatchObject({ check: 'cover_below_minimum', routeRef: 'D-1' });
    expect(f.message).toMatch(/^Cover 0\.33 m at 45\.\d m on D-1, 7 cm below the minimum 0\.40 m\.$/);
    expect(f.fromChainageM).toBe(f.toChainageM);
    const chainages = await depthReadingChainages(db, project.id);
    expect(chainages).toHaveLength(all.length);
    expect(chainages.every((c) => c.routeId === d1 || c.routeId === d2)).toBe(true);
  });

  it('lists the readings on a section\'s stretch, ends included, for the depth plot', async () => {
    const on = await listDepthReadingsOnSection(db, { projectId: project.id, plannedRouteRef: 'D-1', fromChainageM: 20, toChainageM: 50 });
    expect(on.map((r) => Math.round(r.chainageM))).toEqual([20, 25, 40, 45, 50]);
    expect(await listDepthReadingsOnSection(db, { projectId: project.id, plannedRouteRef: null, fromChainageM: 0, toChainageM: 500 })).toEqual([]);
  });
});
