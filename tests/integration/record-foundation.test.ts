import geodesic from 'geographiclib-geodesic';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { listColourSequences, listDuctSizes, listUtilityKinds, listBackfillMaterials } from '@/db/catalogues';
import { getProject, type Project } from '@/db/projects';
import { sectionsOnStretch, listAnchorRoutes } from '@/db/record-anchors';
import type { Principal } from '@/lib/auth/principal';
import { importPlan } from '@/lib/services/planned';
import { changeProject, createProject, createProjectSchema, updateProjectSchema } from '@/lib/services/projects';
import { resolvePointAnchor, resolveStretchAnchor } from '@/lib/services/record-anchors';
import { setOwnUnitSystem } from '@/lib/services/users';
import { correctionSchema, correctSection } from '@/lib/services/corrections';
import { runReconciliation } from '@/lib/services/reconcile';
import { receiveUpload } from '@/lib/services/uploads';
import { makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf } from '../helpers/upload-form';

process.env.STORAGE_DIR = path.resolve(__dirname, '../../.data/test-storage-foundation');
const db = getDb();
afterAll(() => closeDb());

const G = geodesic.Geodesic.WGS84;
const O: [number, number] = [9.2, 52.2];
const east = (m: number, north = 0): [number, number] => {
  const a = G.Direct(O[1], O[0], 90, m);
  const b = G.Direct(a.lat2!, a.lon2!, 0, north);
  return [b.lon2!, b.lat2!];
};

let admin: Principal;
let project: Project;

beforeAll(async () => {
  admin = await makePrincipal(db, 'admin', 'contractor');
  project = await createProject(db, admin, createProjectSchema.parse({ name: `Records ${Date.now()}`, partnerOrganisation: await registerPartner(db, admin, `Records owner ${Date.now()}`) }));
});

describe('catalogues and record settings of a new project', () => {
  it('gives every new project its own copy of the seeded catalogues and the TIA-598 sequence', async () => {
    const sizes = await listDuctSizes(db, project.id);
    // the usual microduct sizes, outer/inner mm [practice]; 7, 14 and 16 mm outer the most common
    expect(sizes.map((s) => `${s.outerMm}/${s.innerMm}`)).toEqual(['7/4', '7/3.5', '10/8', '10/6', '12/8', '14/10', '16/12']);
    expect(sizes.filter((s) => s.common).map((s) => s.outerMm)).toEqual([7, 7, 14, 16]);
    const [seq] = await listColourSequences(db, project.id);
    // TIA-598 (Optical Fiber Cable Color Coding): positions 1–12 [published]
    expect(seq.colours.map((c) => c.name)).toEqual(['blue', 'orange', 'green', 'brown', 'slate', 'white', 'red', 'black', 'yellow', 'violet', 'rose', 'aqua']);
    expect(project.records.colourSequenceId).toBe(seq.id);
    expect((await listUtilityKinds(db, project.id)).map((k) => k.key)).toEqual(['water', 'sewer', 'gas', 'power', 'telecom', 'district_heating', 'other']);
    expect((await listBackfillMaterials(db, project.id)).length).toBeGreaterThan(0);
    // the template rows stay apart: editing the project's copy leaves other projects alone
    expect(Number((await db('duct_sizes').whereNull('project_id').count('* as count'))[0].count)).toBe(7);
    // defaults of common micro-trenching practice: a slot about 24 mm wide and 480 mm deep, 195 °C laying [practice]
    expect(project.records).toMatchObject({ trenchWidthMm: 24, trenchDepthMm: 480, layingTempTargetC: 195, compactionPassesDefault: 3 });
  });

  it('changes record settings within their ranges, with messages naming the range, and refuses a foreign colour sequence', async () => {
    const bad = updateProjectSchema.safeParse({ records: { trenchDepthMm: 20, layingTempTargetC: 500, compactionPassesDefault: 2.5 } });
    expect(bad.success).toBe(false);
    const msgs = bad.error!.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
    expect(msgs.find((m) => m.startsWith('records.trenchDepthMm'))).toMatch(/trench depth.*50/);
    expect(msgs.find((m) => m.startsWith('records.layingTempTargetC'))).toMatch(/laying temperature target.*300/);
    expect(msgs.find((m) => m.startsWith('records.compactionPassesDefault'))).toMatch(/whole number/);
    const after = await changeProject(db, admin, project.id, updateProjectSchema.parse({ records: { trenchDepthMm: 500.4, minClearanceM: 0.25 } }));
    expect(after.records.trenchDepthMm).toBe(500);
    expect(after.records.minClearanceM).toBe(0.25);
    const audit = await db('audit_log').where({ object_id: project.id, action: 'update' }).orderBy('id', 'desc').first();
    expect(audit.after.records.trenchDepthMm).toBe(500);

    const other = await createProject(db, admin, createProjectSchema.parse({ name: `Other ${Date.now()}`, partnerOrganisation: await registerPartner(db, admin, `Other owner ${Date.now()}`) }));
    await expect(changeProject(db, admin, project.id, updateProjectSchema.parse({ records: { colourSequenceId: other.records.colourSequenceId } }))).rejects.toMatchObject({ code: 'invalid', message: expect.stringMatching(/not in this project's catalogue/) });
    // the database holds the same ranges
    await expect(db('projects').where({ id: project.id }).update({ trench_width_mm: 1 })).rejects.toMatchObject({ code: '23514' });
  });

  it("keeps a person's own units, audited", async () => {
    const surveyor = await makePrincipal(db, 'surveyor', 'contractor', admin.organisationName);
    const me = await setOwnUnitSystem(db, surveyor, 'imperial');
    expect(me.unitSystem).toBe('imperial');
    expect((await db('users').where({ id: surveyor.id }).first('unit_system')).unit_system).toBe('imperial');
    expect(await db('audit_log').where({ object_id: surveyor.id, action: 'update' }).first()).toMatchObject({ after: { unitSystem: 'imperial' } });
  });
});

describe('anchoring records on routes', () => {
  let routeId: string;
  beforeAll(async () => {
    const design = JSON.stringify({
      type: 'FeatureCollection',
      features: [
        { type: 'Feature', properties: { route_id: 'AN-1', street: 'Anchor Lane' }, geometry: { type: 'LineString', coordinates: [east(0), east(120)] } },
        { type: 'Feature', properties: { route_id: 'AN-2', street: 'Bollard Row' }, geometry: { type: 'LineString', coordinates: [east(0, 60), east(120, 60)] } },
      ],
    });
    const f = await formOf([{ name: 'anchor.geojson', bytes: design }]);
    await importPlan(db, await makePrincipal(db, 'engineer', 'contractor', admin.organisationName), (await getProject(db, project.id))!, f).finally(() => f.cleanup());
    routeId = (await listAnchorRoutes(db, project.id)).find((r) => r.ref === 'AN-1')!.id;
  });

  it('snaps a GNSS point to the nearest route with its chainage and signed offset (GeographicLib positions)', async () => {
    const [lon, lat] = east(40, 3);
    const a = await resolvePointAnchor(db, project.id, { lon, lat });
    expect(a.routeId).toBe(routeId);
    expect(a.chainageM).toBeCloseTo(40, 2);
    expect(a.offsetM).toBeCloseTo(3, 2);
    const [lon2, lat2] = east(40, 50); // nearer AN-2 (10 m) than AN-1 (50 m)
    expect((await resolvePointAnchor(db, project.id, { lon: lon2, lat: lat2 })).offsetM).toBeCloseTo(-10, 2);
  });

  it('refuses a chainage beyond the end, a position far from every route, and a route of another project', async () => {
    await expect(resolvePointAnchor(db, project.id, { routeId, chainageM: 130 })).rejects.toMatchObject({ code: 'invalid', message: expect.stringMatching(/beyond its end/) });
    const [lon, lat] = east(40, -400);
    await expect(resolvePointAnchor(db, project.id, { lon, lat })).rejects.toMatchObject({ message: expect.stringMatching(/from the nearest route/) });
    await expect(resolveStretchAnchor(db, project.id, { routeId: '00000000-0000-4000-8000-000000000000', fromChainageM: 0, toChainageM: 10 })).rejects.toMatchObject({ message: 'That route is not in this project.' });
    await expect(resolveStretchAnchor(db, project.id, { routeId, fromChainageM: 0, toChainageM: 150 })).rejects.toMatchObject({ message: expect.stringMatching(/cannot end at 150/) });
  });

  it('keeps a record on both halves when a reconciliation splits its section', async () => {
    expect(await sectionsOnStretch(db, project.id, routeId, 20, 60)).toEqual([]);
    const engineer = await makePrincipal(db, 'engineer', 'contractor', admin.organisationName);
    const csv = ['id,lat,lon', ...Array.from({ length: 61 }, (_, i) => { const [lon, lat] = east(2 * i, 0.02); return `${i},${lat.toFixed(9)},${lon.toFixed(9)}`; })].join('\n');
    const up = await formOf([{ name: 'anchor-rtk.csv', bytes: csv }], { accuracy: 'rtk_gnss', surveyDate: '2026-11-20' });
    await receiveUpload(db, engineer, (await getProject(db, project.id))!, up).finally(() => up.cleanup());
    const actor = { userId: engineer.id, label: 'test', organisationId: engineer.organisationId };
    await runReconciliation(db, project.id, null, actor, async () => {});
    const whole = await sectionsOnStretch(db, project.id, routeId, 20, 60);
    expect(whole).toHaveLength(1);
    // a record over 20–60 m, and a point at 40 m, before and after a split at 40 m
    await correctSection(db, engineer, whole[0].id, correctionSchema.parse({ kind: 'split', atChainageM: 40, reason: 'joint pit at 40 m' }));
    await runReconciliation(db, project.id, null, actor, async () => {});
    const halves = await sectionsOnStretch(db, project.id, routeId, 20, 60);
    expect(halves.map((h) => [Math.round(h.fromChainageM), Math.round(h.toChainageM)])).toEqual([[0, 40], [40, 120]]);
    expect(await sectionsOnStretch(db, project.id, routeId, 40, 40)).toHaveLength(2);
    expect(await sectionsOnStretch(db, project.id, routeId, 50, 50)).toHaveLength(1);
    expect(await sectionsOnStretch(db, project.id, routeId, 40, 41)).toHaveLength(1);
  });
});
