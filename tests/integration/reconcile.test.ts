import geodesic from 'geographiclib-geodesic';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getProject, type Project } from '@/db/projects';
import { listCurrentSections } from '@/db/sections';
import type { Principal } from '@/lib/auth/principal';
import { importPlan } from '@/lib/services/planned';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { reviewSection, runReconciliation, sectionFeature } from '@/lib/services/reconcile';
import { excludeFromMatching, exclusionSchema } from '@/lib/services/exclusions';
import { receiveUpload } from '@/lib/services/uploads';
import { makePrincipal, registerPartner } from '../helpers/fixtures';
import { writeSectionsWorkbook } from '@/lib/services/sections-workbook';
import { execFileSync } from 'node:child_process';
import { createWriteStream } from 'node:fs';
import { finished } from 'node:stream/promises';
import os from 'node:os';
import { formOf } from '../helpers/upload-form';
import { mulberry32 } from '@/lib/records/seeded-random';

process.env.STORAGE_DIR = path.resolve(__dirname, '../../.data/test-storage-reconcile');
const G = geodesic.Geodesic.WGS84;
const db = getDb();
let engineer: Principal;
let surveyor: Principal;
let project: Project;

// two routes of the fictional town, drawn due east and due north from a corner (positions by GeographicLib)
const CORNER: [number, number] = [9.112, 52.108];
const along = (azi: number, s: number, left = 0): [number, number] => {
  const p = G.Direct(CORNER[1], CORNER[0], azi, s);
  if (!left) return [p.lon2!, p.lat2!];
  const q = G.Direct(p.lat2!, p.lon2!, p.azi2! - 90, left);
  return [q.lon2!, q.lat2!];
};
const design = (street: string) =>
  JSON.stringify({
    type: 'FeatureCollection',
    features: [
      { type: 'Feature', properties: { route_id: 'E-1', street, bundle: '12x7mm' }, geometry: { type: 'LineString', coordinates: [along(90, 0), along(90, 150)] } },
      { type: 'Feature', properties: { route_id: 'N-1', street: 'Kilnfield Way', bundle: '7x7mm' }, geometry: { type: 'LineString', coordinates: [along(90, 0), along(0, 120)] } },
    ],
  });

function rng(seed: number) {
  const u = mulberry32(seed);
  return () => Math.sqrt(-2 * Math.log(u() + 1e-12)) * Math.cos(2 * Math.PI * u());
}

/** A handheld walk east along E-1 at 1.3 m/s, 1 Hz, σ 3 m per axis. */
function walkGpx(seed: number): string {
  const n = rng(seed);
  const pts: string[] = [];
  for (let i = 0; i * 1.3 <= 150; i++) {
    const [lon, lat] = along(90, i * 1.3, 3 * n());
    const jitter = G.Direct(lat, lon, 90, 3 * n());
    pts.push(`<trkpt lat="${jitter.lat2!.toFixed(8)}" lon="${jitter.lon2!.toFixed(8)}"><time>${new Date(Date.UTC(2026, 10, 5, 9, 0, i)).toISOString()}</time></trkpt>`);
  }
  return `<?xml version="1.0"?><gpx version="1.1" creator="seed ${seed}" xmlns="http://www.topografix.com/GPX/1/1"><trk><trkseg>${pts.join('')}</trkseg></trk></gpx>`;
}

/** RTK points north along N-1, 2 cm noise, laid 0.9 m to the left (west) between 40 and 80 m. */
function rtkCsv(): string {
  const n = rng(99);
  const rows = ['id,lat,lon'];
  for (let s = 0; s <= 120; s += 2) {
    const [lon, lat] = along(0, s + 0.02 * n(), (s >= 40 && s <= 80 ? 0.9 : 0) + 0.02 * n());
    rows.push(`${s},${lat.toFixed(9)},${lon.toFixed(9)}`);
  }
  return rows.join('\n') + '\n';
}

async function upload(name: string, text: string, fields: Record<string, string>) {
  const form = await formOf([{ name, bytes: text }], fields);
  try {
    return (await receiveUpload(db, surveyor, project, form)).upload;
  } finally {
    await form.cleanup();
  }
}
async function plan(text: string) {
  const form = await formOf([{ name: 'design.geojson', bytes: text }]);
  try {
    return (await importPlan(db, engineer, project, form)).version;
  } finally {
    await form.cleanup();
  }
}
const run = () => runReconciliation(db, project.id, null, { userId: engineer.id, label: 'test', organisationId: engineer.organisationId }, async () => {});
const ids = async () => (await listCurrentSections(db, project.id)).map((s) => s.id).sort();

beforeAll(async () => {
  const admin = await makePrincipal(db, 'admin', 'contractor');
  engineer = await makePrincipal(db, 'engineer', 'contractor', admin.organisationName);
  surveyor = await makePrincipal(db, 'surveyor', 'contractor', admin.organisationName);
  project = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: 'Reconcile', partnerOrganisation: await registerPartner(db, admin, `R owner ${Date.now()}`), lateralToleranceM: 0.5 }))).id))!;
  await plan(design('Ferrous Street'));
  await upload('walk.gpx', walkGpx(1), { accuracy: 'handheld_gnss', surveyDate: '2026-11-05' });
  await upload('rtk.csv', rtkCsv(), { accuracy: 'rtk_gnss', surveyDate: '2026-11-06' });
});
afterAll(() => closeDb());

describe('reconciliation', () => {
  it('derives sections for both routes: the handheld walk as planned, the RTK shift as deviates', async () => {
    const out = await run();
    expect(out.run).toBe(1);
    const sections = await listCurrentSections(db, project.id);
    const east = sections.filter((s) => s.plannedRouteRef === 'E-1');
    const builtEast = east.filter((s) => s.status === 'as_planned').reduce((n, s) => n + s.toChainageM - s.fromChainageM, 0);
    expect(builtEast / 150).toBeGreaterThan(0.95);
    const north = sections.filter((s) => s.plannedRouteRef === 'N-1');
    const dev = north.filter((s) => s.status === 'deviates');
    expect(dev).toHaveLength(1);
    expect(dev[0].fromChainageM).toBeGreaterThan(36);
    expect(dev[0].toChainageM).toBeLessThan(84);
    expect(Math.abs(dev[0].maxOffsetM! - 0.9)).toBeLessThan(0.1);
    expect(dev[0].accuracyM!).toBeLessThan(0.1);
    expect(dev[0].laidOn).toBe('2026-11-06');
    // RFC 7946: the feature id is the section id; lon/lat order; the listed properties
    const f = sectionFeature(dev[0]);
    expect(f.id).toBe(dev[0].id);
    expect(Object.keys(f.properties).sort()).toEqual(['accuracyM', 'fromChainageM', 'laidOn', 'lengthM', 'maxOffsetM', 'p95OffsetM', 'plannedRouteRef', 'review', 'sourceUploadIds', 'status', 'toChainageM']);
    expect(f.geometry.coordinates[0][0]).toBeCloseTo(CORNER[0], 2);
  });

  it('gives the same sections with the same ids on a second run', async () => {
    const before = await ids();
    const out = await run();
    expect(out.created).toBe(0);
    expect(out.retired).toBe(0);
    expect(await ids()).toEqual(before);
  });

  it('keeps an approval across a re-run, an overlapping upload and a plan revision', async () => {
    const target = (await listCurrentSections(db, project.id)).find((s) => s.plannedRouteRef === 'N-1' && s.status === 'deviates')!;
    await reviewSection(db, engineer, target.id, { decision: 'approve', comment: 'checked on site' });
    await run();
    await upload('walk-again.gpx', walkGpx(2), { accuracy: 'handheld_gnss', surveyDate: '2026-11-07' });
    await run();
    await plan(design('Ferrous Street (renamed)'));
    await run();
    const after = (await listCurrentSections(db, project.id)).find((s) => s.id === target.id);
    expect(after).toBeDefined();
    expect(after!.review).toBe('approved');
    expect(after!.retiredInRun).toBeNull();
  });

  it('resets an approval when the geometry changes, with the reason in the audit log', async () => {
    const s = (await listCurrentSections(db, project.id)).find((x) => x.plannedRouteRef === 'N-1' && x.status === 'deviates')!;
    // a corrected RTK survey moves the stretch about 14 cm east, across the route: its geometry changes
    const old = await db('uploads').where({ project_id: project.id, file_name: 'rtk.csv' }).first('id');
    await upload('rtk-corrected.csv', rtkCsv().replace(/\n(\d+),(\d+\.\d+),(\d+\.\d+)/g, (_m, id, lat, lon) => `\n${id},${lat},${(Number(lon) + 2e-6).toFixed(9)}`), { accuracy: 'rtk_gnss', surveyDate: '2026-11-08', supersedes: old.id });
    await run();
    const after = (await listCurrentSections(db, project.id)).find((x) => x.id === s.id);
    // the same stretch keeps its id, but its approval does not survive the new geometry
    expect(after).toBeDefined();
    expect(after!.review).toBe('pending');
    const audit = await db('audit_log').where({ project_id: project.id, object_id: s.id, action: 'review_reset' });
    expect(audit).toHaveLength(1);
    expect(audit[0].after.reason).toMatch(/changed the section's geometry/);
  });

  it('exports the sections as an Excel workbook that an independent reader opens', async () => {
    const sections = await listCurrentSections(db, project.id);
    const file = path.join(os.tmpdir(), `sections-${Date.now()}.xlsx`);
    const out = createWriteStream(file);
    await writeSectionsWorkbook(sections, { projectName: 'Reconcile', timeZone: 'Europe/Berlin', streets: new Map([['E-1', 'Ferrous Street'], ['N-1', 'Kilnfield Way']]), uploadNames: new Map(), generatedAt: new Date() }, out);
    await finished(out);
    // Debian's python3-openpyxl, under Debian's /usr/bin/python3, reads the file: the independent side of this check
    const script = [
      'import json, sys, openpyxl',
      'ws = openpyxl.load_workbook(sys.argv[1]).active',
      'rows = list(ws.iter_rows(values_only=True))',
      'print(json.dumps({"title": ws.title, "header": rows[0], "n": len(rows) - 1, "first": [str(type(v).__name__) for v in rows[1]], "laid": [str(r[12]) for r in rows[1:]]}))',
    ].join('\n');
    const got = JSON.parse(execFileSync('/usr/bin/python3', ['-c', script, file], { encoding: 'utf8' }));
    expect(got.title).toBe('Sections');
    expect(got.n).toBe(sections.length);
    expect(got.header.slice(0, 7)).toEqual(['Section id', 'Route', 'Street', 'From chainage (m)', 'To chainage (m)', 'Length (m)', 'Status']);
    // numbers stay numbers; the laid date is a date cell (OOXML serial dates, ECMA-376)
    expect(got.first[3]).toMatch(/^(int|float)$/);
    const dated = sections.findIndex((x) => x.laidOn !== null);
    expect(got.laid[dated]).toBe(`${sections[dated].laidOn} 00:00:00`);
  });

  it('leaves an excluded stretch of the walks out of matching, keeping the originals', async () => {
    const builtEast = async () => (await listCurrentSections(db, project.id)).filter((x) => x.plannedRouteRef === 'E-1' && x.status !== 'not_built').reduce((n, x) => n + x.toChainageM - x.fromChainageM, 0);
    expect(await builtEast()).toBeGreaterThan(140);
    const walks = await db('uploads').where({ project_id: project.id }).whereIn('file_name', ['walk.gpx', 'walk-again.gpx']).select('id');
    const files = Number((await db('upload_files').count('* as n'))[0].n);
    for (const w of walks) {
      // fix i of each walk is at 09:00:00 + i s and 1.3·i m along E-1: 38–85 s is about 50–110 m of the route
      await excludeFromMatching(db, engineer, project.id, w.id, exclusionSchema.parse({ kind: 'time', from: '2026-11-05T09:00:38Z', to: '2026-11-05T09:01:25Z', reason: 'walked back to the van' }));
    }
    await run();
    const built = await builtEast();
    expect(built).toBeLessThan(150 - 45);
    expect(built).toBeGreaterThan(150 - 75);
    expect(Number((await db('upload_files').count('* as n'))[0].n)).toBe(files);
    expect(await db('audit_log').where({ project_id: project.id, action: 'exclude_range' })).toHaveLength(walks.length);
    expect(exclusionSchema.safeParse({ kind: 'distance', from: 20, to: 10, reason: 'backwards' }).success).toBe(false);
    expect(exclusionSchema.safeParse({ kind: 'time', from: 'yesterday', to: '2026-11-03T09:00:00Z', reason: 'bad time' }).success).toBe(false);
  });
});
