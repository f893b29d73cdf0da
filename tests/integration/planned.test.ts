import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getProject, type Project } from '@/db/projects';
import { listPlannedRoutes } from '@/db/planned';
import type { Principal } from '@/lib/auth/principal';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { importPlan, plannedFeatureCollection } from '@/lib/services/planned';
import { count, makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf } from '../helpers/upload-form';

process.env.STORAGE_DIR = path.resolve(__dirname, '../../.data/test-storage-plan');
const db = getDb();
let engineer: Principal;
let project: Project;

type Line = { ref: string; street: string; bundle: string; type: string; coords: [number, number][] };
const design = (lines: Line[]) =>
  JSON.stringify({
    type: 'FeatureCollection',
    features: lines.map((l) => ({ type: 'Feature', properties: { Route_ID: l.ref, Street: l.street, Bundle: l.bundle, Type: l.type }, geometry: { type: 'LineString', coordinates: l.coords } })),
  });

// a small part of the fictional town: two street routes meeting at a T and a road crossing
const V1: Line[] = [
  { ref: 'R-1', street: 'Mossbank Lane', bundle: '12x7mm', type: 'street route', coords: [[9.1050, 52.1050], [9.1060, 52.1050], [9.1070, 52.1050]] },
  { ref: 'R-2', street: 'Tallow Row', bundle: '7x7mm', type: 'street route', coords: [[9.1060, 52.1050], [9.1060, 52.1060]] },
  { ref: 'X-1', street: 'Mossbank Lane', bundle: '1x14mm', type: 'road crossing', coords: [[9.1055, 52.1050], [9.1055, 52.10492]] },
  { ref: 'R-3', street: 'Heron Court', bundle: '4x7mm', type: 'street route', coords: [[9.1070, 52.1050], [9.1080, 52.1052]] },
];

async function send(text: string, fields: Record<string, string> = {}) {
  const form = await formOf([{ name: 'design.geojson', bytes: text }], fields);
  try {
    return await importPlan(db, engineer, project, form);
  } finally {
    await form.cleanup();
  }
}

beforeAll(async () => {
  const admin = await makePrincipal(db, 'admin', 'contractor');
  engineer = await makePrincipal(db, 'engineer', 'contractor', admin.organisationName);
  project = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: 'Plan test', partnerOrganisation: await registerPartner(db, admin, `Plan owner ${Date.now()}`) }))).id))!;
});
afterAll(() => closeDb());

describe('planned network import', () => {
  it('imports version 1 with a guessed mapping, derives the extent and reports the guess', async () => {
    const { version, created } = await send(design(V1));
    expect(created).toBe(true);
    expect(version).toMatchObject({ version: 1, routeCount: 4, mappingGuessed: true, mapping: { ref: 'Route_ID', street: 'Street', ducts: 'Bundle', kind: 'Type' } });
    expect(version.changes.added).toEqual(['R-1', 'R-2', 'R-3', 'X-1']);
    expect(version.warnings.join(' ')).toMatch(/mapping guessed/);
    const routes = await listPlannedRoutes(db, project.id);
    expect(routes.find((r) => r.ref === 'X-1')!.kind).toBe('crossing');
    expect(routes.find((r) => r.ref === 'R-1')!.ducts).toBe('12x7mm');
    // geodesic length against PostGIS's spheroid length of the stored line, an independent producer
    const [{ len }] = (await db.raw(`select ST_Length(geom::geography) as len from planned_routes where project_id = ? and ref = 'R-1'`, [project.id])).rows;
    expect(routes.find((r) => r.ref === 'R-1')!.lengthM).toBeCloseTo(len, 3);
    const p = (await getProject(db, project.id))!;
    expect(p.extent![0]).toBeLessThan(9.105);
    expect(p.extent![2]).toBeGreaterThan(9.108);
  });

  it('returns the same version for the same file', async () => {
    const before = await count(db, 'plan_versions');
    const { version, created } = await send(design(V1));
    expect(created).toBe(false);
    expect(version.version).toBe(1);
    expect(await count(db, 'plan_versions')).toBe(before);
  });

  it('turns a revision into version 2 with its change list; removed routes stay, flagged', async () => {
    const v2: Line[] = [
      { ...V1[0] },
      { ...V1[1], coords: [[9.1060, 52.1050], [9.10605, 52.1055], [9.1060, 52.1060]] }, // reshaped
      { ...V1[2], bundle: '2x14mm' }, // retagged
      { ref: 'R-4', street: 'Heron Court', bundle: '4x7mm', type: 'street route', coords: [[9.1070, 52.1050], [9.1070, 52.1040]] }, // added; R-3 removed
    ];
    const { version } = await send(design(v2));
    expect(version.version).toBe(2);
    expect(version.changes).toEqual({ added: ['R-4'], removed: ['R-3'], reshaped: ['R-2'], retagged: ['X-1'], unchanged: ['R-1'] });
    const all = await listPlannedRoutes(db, project.id, true);
    const r3 = all.find((r) => r.ref === 'R-3')!;
    expect(r3.removedInVersion).toBe(2);
    const current = await plannedFeatureCollection(db, project.id, false);
    expect(current.features.map((f) => f.properties.ref).sort()).toEqual(['R-1', 'R-2', 'R-4', 'X-1']);
    const history = await db('planned_route_history').where({ route_id: r3.id }).orderBy('version').select('version', 'change');
    expect(history).toEqual([{ version: 1, change: 'added' }, { version: 2, change: 'removed' }]);
    const audit = await db('audit_log').where({ project_id: project.id, object_type: 'plan_version' }).orderBy('id');
    expect(audit.map((a) => a.after.version)).toEqual([1, 2]);
  });

  it('refuses a mapping naming an attribute the design lacks, storing nothing', async () => {
    const before = { versions: await count(db, 'plan_versions'), routes: await count(db, 'planned_routes') };
    const err = await send(design(V1.slice(0, 2)), { mapping: JSON.stringify({ ref: 'route_no' }) }).catch((e) => e);
    expect(err.code).toBe('invalid');
    expect(err.message).toContain("no attribute 'route_no'");
    expect({ versions: await count(db, 'plan_versions'), routes: await count(db, 'planned_routes') }).toEqual(before);
  });

  it('refuses a GPS trace as a design', async () => {
    const gpx = '<?xml version="1.0"?><gpx version="1.1" xmlns="http://www.topografix.com/GPX/1/1"><trk><trkseg><trkpt lat="52.1" lon="9.1"/><trkpt lat="52.1001" lon="9.1001"/></trkseg></trk></gpx>';
    const form = await formOf([{ name: 'walk.gpx', bytes: gpx }]);
    const err = await importPlan(db, engineer, project, form).catch((e) => e).finally(() => form.cleanup());
    expect(err.code).toBe('unsupported_format');
  });
});
