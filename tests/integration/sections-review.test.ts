import geodesic from 'geographiclib-geodesic';
import { execFileSync } from 'node:child_process';
import { createWriteStream, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { finished } from 'node:stream/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getProject, type Project } from '@/db/projects';
import { listCurrentSections, type Section } from '@/db/sections';
import { AppError } from '@/lib/api/errors';
import type { Principal } from '@/lib/auth/principal';
import { mulberry32 } from '@/lib/records/seeded-random';
import { importPlan } from '@/lib/services/planned';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { bulkReviewSchema, reviewProgress, reviewSchema, reviewSection, reviewSections, runReconciliation, sectionFeature } from '@/lib/services/reconcile';
import { loadExportContext, sectionsCsvZip, sectionsGeoJson } from '@/lib/services/sections-export';
import { writeSectionsWorkbook } from '@/lib/services/sections-workbook';
import { receiveUpload } from '@/lib/services/uploads';
import { count, makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf } from '../helpers/upload-form';

process.env.STORAGE_DIR = path.resolve(__dirname, '../../.data/test-storage-sections-review');
const G = geodesic.Geodesic.WGS84;
const db = getDb();
let admin: Principal;
let engineer: Principal;
let surveyor: Principal;
let project: Project;
let other: Project;

// one route due east from a corner of the fictional town (positions by GeographicLib)
const CORNER: [number, number] = [9.131, 52.114];
const at = (lat: number, lon: number, azi: number, s: number): [number, number] => {
  const p = G.Direct(lat, lon, azi, s);
  return [p.lon2!, p.lat2!];
};
const design = JSON.stringify({
  type: 'FeatureCollection',
  features: [{ type: 'Feature', properties: { route_id: 'E-9', street: 'Tallowgate', bundle: '12x7mm' }, geometry: { type: 'LineString', coordinates: [CORNER, at(CORNER[1], CORNER[0], 90, 150)] } }],
});

function gauss(seed: number) {
  const u = mulberry32(seed);
  return () => Math.sqrt(-2 * Math.log(u() + 1e-12)) * Math.cos(2 * Math.PI * u());
}

/**
 * A handheld walk (1 Hz, 1.3 m/s, σ 1.5 m) east along E-9 from `fromM` to `toM`, then, if `southM`, off the
 * plan due south for that many metres: an unplanned line. Fix i is at 09:00:00 + i s on `day`.
 */
function walk(seed: number, fromM: number, toM: number, southM: number, day: string): string {
  const n = gauss(seed);
  const pts: [number, number][] = [];
  for (let s = fromM; s <= toM; s += 1.3) pts.push(at(CORNER[1], CORNER[0], 90, s));
  const turn = at(CORNER[1], CORNER[0], 90, toM);
  for (let s = 1.3; s <= southM; s += 1.3) pts.push(at(turn[1], turn[0], 180, s));
  const t0 = Date.parse(`${day}T09:00:00Z`);
  const trkpts = pts.map(([lon, lat], i) => {
    const q = G.Direct(lat, lon, 90, 1.5 * n());
    const r = G.Direct(q.lat2!, q.lon2!, 0, 1.5 * n());
    return `<trkpt lat="${r.lat2!.toFixed(8)}" lon="${r.lon2!.toFixed(8)}"><time>${new Date(t0 + i * 1000).toISOString()}</time></trkpt>`;
  });
  return `<?xml version="1.0"?><gpx version="1.1" creator="seed ${seed}" xmlns="http://www.topografix.com/GPX/1/1"><trk><trkseg>${trkpts.join('')}</trkseg></trk></gpx>`;
}

async function upload(p: Project, name: string, text: string) {
  const form = await formOf([{ name, bytes: text }], { accuracy: 'handheld_gnss', surveyDate: '2026-11-05' });
  try {
    return (await receiveUpload(db, surveyor, p, form)).upload;
  } finally {
    await form.cleanup();
  }
}
async function plan(p: Project) {
  const form = await formOf([{ name: 'design.geojson', bytes: design }]);
  try {
    await importPlan(db, engineer, p, form);
  } finally {
    await form.cleanup();
  }
}
const run = (p: Project) => runReconciliation(db, p.id, null, { userId: engineer.id, label: 'test', organisationId: engineer.organisationId }, async () => {});
const current = () => listCurrentSections(db, project.id);
const audits = (action: string) => db('audit_log').where({ project_id: project.id, action }).count<{ n: number }[]>('* as n').then((r) => Number(r[0].n));

async function refused(p: Promise<unknown>): Promise<AppError> {
  const err = await p.then(() => null, (e: unknown) => e);
  expect(err).toBeInstanceOf(AppError);
  return err as AppError;
}

beforeAll(async () => {
  admin = await makePrincipal(db, 'admin', 'contractor');
  engineer = await makePrincipal(db, 'engineer', 'contractor', admin.organisationName);
  surveyor = await makePrincipal(db, 'surveyor', 'contractor', admin.organisationName);
  const partner = await registerPartner(db, admin, `SR owner ${Date.now()}`);
  const make = async (name: string) => (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name, partnerOrganisation: partner, lateralToleranceM: 0.5, timeZone: 'Europe/Berlin' }))).id))!;
  project = await make(`Sections review ${Date.now()}`);
  other = await make(`Sections review other ${Date.now()}`);
  await plan(project);
  await plan(other);
  // built 0–90 m, then off the plan 45 m south: 90–150 m of E-9 is not built
  await upload(project, 'walk-west-half.gpx', walk(7, 0, 90, 45, '2026-11-05'));
  await upload(other, 'walk-other.gpx', walk(8, 0, 150, 0, '2026-11-05'));
  await run(project);
  await run(other);
});
afterAll(() => closeDb());
const tmpDirs: string[] = [];
afterAll(() => tmpDirs.forEach((d) => rmSync(d, { recursive: true, force: true })));

describe('figures nothing measured', () => {
  it('stores and exports no offset and no accuracy for a not-built stretch, no offset for an unplanned line', async () => {
    const sections = await current();
    const gap = sections.find((s) => s.status === 'not_built')!;
    const loose = sections.find((s) => s.status === 'unplanned')!;
    const built = sections.find((s) => s.status === 'as_planned')!;
    expect(gap && loose && built).toBeTruthy();
    expect([gap.maxOffsetM, gap.p95OffsetM, gap.accuracyM]).toEqual([null, null, null]);
    expect([loose.maxOffsetM, loose.p95OffsetM]).toEqual([null, null]);
    // an unplanned line is measured: its position accuracy is a real figure
    expect(loose.accuracyM).toBeGreaterThan(0);
    expect(built.accuracyM).toBeGreaterThan(0);
    // the rows themselves hold NULL, not 0 (what a reader of the database sees)
    const row = await db('sections').where({ id: gap.id }).first('max_offset_m', 'p95_offset_m', 'accuracy_m');
    expect(row).toEqual({ max_offset_m: null, p95_offset_m: null, accuracy_m: null });
    const f = sectionFeature(gap);
    expect([f.properties.maxOffsetM, f.properties.p95OffsetM, f.properties.accuracyM]).toEqual([null, null, null]);
  });
});

describe('review', () => {
  it('refuses to approve a not-built stretch and acknowledges it with a reason, which settles it', async () => {
    const gap = (await current()).find((s) => s.status === 'not_built')!;
    const err = await refused(reviewSection(db, engineer, gap.id, reviewSchema.parse({ decision: 'approve' })));
    expect(err.status).toBe(409);
    expect(err.message).toMatch(/acknowledge/);
    expect(reviewSchema.safeParse({ decision: 'acknowledge', comment: '' }).success).toBe(false);
    const built = (await current()).find((s) => s.status === 'as_planned')!;
    expect((await refused(reviewSection(db, engineer, built.id, reviewSchema.parse({ decision: 'acknowledge', comment: 'nothing to acknowledge' })))).status).toBe(409);
    const before = await audits('review_acknowledged');
    const s = await reviewSection(db, engineer, gap.id, reviewSchema.parse({ decision: 'acknowledge', comment: 'phase 2: the owner withdrew the last three addresses' }));
    expect(s.review).toBe('acknowledged');
    expect(s.reviewComment).toMatch(/phase 2/);
    expect(await audits('review_acknowledged')).toBe(before + 1);
  });

  it('reviews many sections in one request, one audit entry each, or none at all when one does not fit', async () => {
    const sections = await current();
    const built = sections.filter((s) => s.status !== 'not_built');
    const gap = sections.find((s) => s.status === 'not_built')!;
    const foreign = (await listCurrentSections(db, other.id))[0];
    const approvals = await audits('review_approved');
    const audited = await count(db, 'audit_log');
    // a not-built stretch among the approvals: the whole request is refused, each misfit named
    const mixed = await refused(reviewSections(db, engineer, project.id, bulkReviewSchema.parse({ sectionIds: [...built.map((s) => s.id), gap.id], decision: 'approve' })));
    expect(mixed.status).toBe(409);
    expect(mixed.details).toEqual([expect.objectContaining({ path: `sectionIds.${built.length}`, message: expect.stringMatching(/nothing laid to approve/) })]);
    // another project's section is not this project's to review
    const stray = await refused(reviewSections(db, engineer, project.id, bulkReviewSchema.parse({ sectionIds: [built[0].id, foreign.id], decision: 'approve' })));
    expect(stray.details).toEqual([expect.objectContaining({ path: 'sectionIds.1', message: expect.stringMatching(/No such section/) })]);
    expect(await count(db, 'audit_log')).toBe(audited);
    expect((await current()).filter((s) => s.review === 'approved')).toHaveLength(0);
    expect((await listCurrentSections(db, other.id)).every((s) => s.review === 'pending')).toBe(true);

    expect(reviewProgress(await current()).fullyApproved).toBe(false);
    const out = await reviewSections(db, engineer, project.id, bulkReviewSchema.parse({ sectionIds: built.map((s) => s.id), decision: 'approve', comment: 'walked with the site lead' }));
    expect(out.reviewed).toBe(built.length);
    expect(await audits('review_approved')).toBe(approvals + built.length);
    const entries = await db('audit_log').where({ project_id: project.id, action: 'review_approved' }).whereIn('object_id', built.map((s) => s.id));
    expect(new Set(entries.map((e) => e.object_id))).toEqual(new Set(built.map((s) => s.id)));
    const progress = reviewProgress(await current());
    expect(progress).toMatchObject({ total: built.length + 1, approved: built.length, acknowledged: 1, pending: 0, fullyApproved: true });
  });

  it('puts an acknowledged stretch back to pending when a later upload shows it built', async () => {
    const gap = (await current()).find((s) => s.status === 'not_built')!;
    await upload(project, 'walk-east-half.gpx', walk(9, 85, 150, 0, '2026-11-06'));
    await run(project);
    const after = await db('sections').where({ id: gap.id }).first('review', 'status', 'retired_in_run');
    // the same stretch, now built, keeps its id; its acknowledgement does not survive, with the reason logged
    expect(after).toEqual({ review: 'pending', status: 'as_planned', retired_in_run: null });
    const reset = await db('audit_log').where({ project_id: project.id, object_id: gap.id, action: 'review_reset' });
    expect(reset).toHaveLength(1);
    expect(reset[0].before).toMatchObject({ review: 'acknowledged', status: 'not_built' });
    const now = await current();
    expect(now.filter((s) => s.plannedRouteRef === 'E-9' && s.status === 'not_built')).toHaveLength(0);
    expect(reviewProgress(now).fullyApproved).toBe(false);
  });
});

describe('exports', () => {
  let sections: Section[];
  const dir = mkdtempSync(path.join(os.tmpdir(), 'sections-export-'));
  tmpDirs.push(dir);
  beforeAll(async () => {
    // back to a not-built stretch: a fresh project with the half walk only
    const partner = await registerPartner(db, admin, `SR export owner ${Date.now()}`);
    const p = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: `Sections export ${Date.now()}`, partnerOrganisation: partner, timeZone: 'Europe/Berlin' }))).id))!;
    await plan(p);
    await upload(p, 'Straße-Nord walk.gpx', walk(7, 0, 90, 45, '2026-11-05'));
    await run(p);
    project = p;
    sections = await current();
  });

  it('downloads the CSV as a zip that Python\'s zipfile and csv modules and GDAL\'s CSV driver read', async () => {
    const zip = await sectionsCsvZip(sections, await loadExportContext(db, project));
    const file = path.join(dir, 'sections-csv.zip');
    writeFileSync(file, zip);
    // Python's standard zipfile and csv modules (Debian's /usr/bin/python3): the independent readers
    const script = [
      'import csv, io, json, sys, zipfile',
      'z = zipfile.ZipFile(sys.argv[1])',
      'assert z.testzip() is None',
      'rows = list(csv.DictReader(io.StringIO(z.read("sections.csv").decode("utf-8"), newline="")))',
      'print(json.dumps({"names": sorted(z.namelist()), "readme": z.read("README.txt").decode("utf-8"), "rows": rows}))',
    ].join('\n');
    const got = JSON.parse(execFileSync('/usr/bin/python3', ['-c', script, file], { encoding: 'utf8' }));
    expect(got.names).toEqual(['README.txt', 'sections.csv', 'sections.csvt', 'sections.prj']);
    expect(got.readme).toMatch(/Caution: positions are records, not a locate/);
    expect(got.readme).toMatch(/EPSG:4326/);
    expect(Object.keys(got.rows[0])).toEqual(expect.arrayContaining(['Route', 'Street', 'Length (m)', 'Max offset from plan (m)', 'Position accuracy, 95 % radius (m)', 'Source uploads', 'Laid on', 'Review', 'WKT']));
    expect(got.rows).toHaveLength(sections.length);
    const gap = got.rows.find((r: Record<string, string>) => r.Status === 'not built');
    const loose = got.rows.find((r: Record<string, string>) => r.Status === 'unplanned');
    const built = got.rows.find((r: Record<string, string>) => r.Status === 'as planned');
    // empty, not 0: nothing measured these figures
    expect([gap['Max offset from plan (m)'], gap['P95 offset from plan (m)'], gap['Position accuracy, 95 % radius (m)']]).toEqual(['', '', '']);
    expect([loose['Max offset from plan (m)'], loose['P95 offset from plan (m)']]).toEqual(['', '']);
    expect(Number(loose['Position accuracy, 95 % radius (m)'])).toBeGreaterThan(0);
    expect(built.Street).toBe('Tallowgate');
    expect(built['Source uploads']).toBe('Straße-Nord walk.gpx');
    expect(Number(built['Length (m)'])).toBeCloseTo(sections.find((s) => s.id === built['Section id'])!.lengthM, 3);

    // GDAL's CSV driver through /vsizip/ (GDAL 3.6: ogrinfo's summary for the schema, ogr2ogr to GeoJSON for
    // the values): the header is line 1, the .csvt types and the .prj coordinate system apply
    const src = `/vsizip/${file}/sections.csv`;
    const summary = execFileSync('ogrinfo', ['-ro', '-so', '-al', src], { encoding: 'utf8' });
    expect(summary).toMatch(new RegExp(`Feature Count: ${sections.length}\\b`));
    // the WKT column is the geometry: GDAL's extent is the sections' own
    const extent = /Extent: \(([-\d.]+), ([-\d.]+)\) - \(([-\d.]+), ([-\d.]+)\)/.exec(summary)!.slice(1).map(Number);
    const all = sections.flatMap((x) => x.coords);
    expect(extent[0]).toBeCloseTo(Math.min(...all.map((c) => c[0])), 5);
    expect(extent[3]).toBeCloseTo(Math.max(...all.map((c) => c[1])), 5);
    expect(summary).toMatch(/GEOGCRS\["WGS 84"|GEOGCS\["(GCS_)?WGS[ _]84"/);
    expect(summary).toMatch(/^Length \(m\): Real/m);
    expect(summary).toMatch(/^Laid on: Date/m);
    const gj = JSON.parse(execFileSync('ogr2ogr', ['-f', 'GeoJSON', '/vsistdout/', src], { encoding: 'utf8' }));
    expect(gj.features).toHaveLength(sections.length);
    const gdalGap = gj.features.find((f: { properties: Record<string, unknown> }) => f.properties.Status === 'not built');
    // an empty Real cell is an unset field to GDAL (left out of its GeoJSON), not 0
    expect(gdalGap.properties).not.toHaveProperty('Max offset from plan (m)');
    expect(gdalGap.properties).not.toHaveProperty('Position accuracy, 95 % radius (m)');
    expect(gdalGap.geometry.type).toBe('LineString');
    const gdalBuilt = gj.features.find((f: { properties: Record<string, unknown> }) => f.properties.Status === 'as planned');
    expect(typeof gdalBuilt.properties['Length (m)']).toBe('number');
  });

  it('writes GeoJSON that GDAL reads, with null where nothing was measured and the caution as a foreign member', async () => {
    const file = path.join(dir, 'sections.geojson');
    const body = sectionsGeoJson(sections);
    writeFileSync(file, JSON.stringify(body));
    expect(body.caution).toMatch(/not a locate/);
    // GDAL's GeoJSON driver (an independent reader of RFC 7946) reads every feature back, nulls as nulls
    const back = JSON.parse(execFileSync('ogr2ogr', ['-f', 'GeoJSON', '/vsistdout/', file], { encoding: 'utf8' }));
    expect(back.features).toHaveLength(sections.length);
    const gap = back.features.find((f: { properties: Record<string, unknown> }) => f.properties.status === 'not_built');
    expect([gap.properties.maxOffsetM, gap.properties.p95OffsetM, gap.properties.accuracyM]).toEqual([null, null, null]);
    const built = back.features.find((f: { properties: Record<string, unknown> }) => f.properties.status === 'as_planned');
    expect(typeof built.properties.accuracyM).toBe('number');
    expect(execFileSync('ogrinfo', ['-ro', '-so', '-al', file], { encoding: 'utf8' })).toMatch(/WGS 84/);
  });

  it('writes the Excel workbook with the same headers, empty cells where nothing was measured, and a read-me sheet (openpyxl)', async () => {
    const file = path.join(dir, 'sections.xlsx');
    const out = createWriteStream(file);
    await writeSectionsWorkbook(sections, await loadExportContext(db, project), out);
    await finished(out);
    // Debian's python3-openpyxl reads the file: the independent side of this check
    const script = [
      'import json, sys, openpyxl',
      'wb = openpyxl.load_workbook(sys.argv[1])',
      'ws = wb["Sections"]',
      'rows = [list(r) for r in ws.iter_rows(values_only=True)]',
      'notes = [r[0] for r in wb["Read me"].iter_rows(values_only=True)]',
      'print(json.dumps({"sheets": wb.sheetnames, "header": rows[0], "rows": [[v if v is None or isinstance(v, (int, float, str)) else str(v) for v in r] for r in rows[1:]], "notes": notes}))',
    ].join('\n');
    const got = JSON.parse(execFileSync('/usr/bin/python3', ['-c', script, file], { encoding: 'utf8' }));
    expect(got.sheets).toEqual(['Sections', 'Read me']);
    const col = (name: string) => got.header.indexOf(name);
    expect(col('Max offset from plan (m)')).toBeGreaterThan(0);
    const gap = got.rows.find((r: unknown[]) => r[col('Status')] === 'not built');
    expect([gap[col('Max offset from plan (m)')], gap[col('P95 offset from plan (m)')], gap[col('Position accuracy, 95 % radius (m)')]]).toEqual([null, null, null]);
    const built = got.rows.find((r: unknown[]) => r[col('Status')] === 'as planned');
    expect(typeof built[col('Length (m)')]).toBe('number');
    expect(built[col('Street')]).toBe('Tallowgate');
    expect(built[col('Source uploads')]).toBe('Straße-Nord walk.gpx');
    expect(got.notes.join('\n')).toMatch(/not a locate[\s\S]*EPSG:4326/);
  });
});
