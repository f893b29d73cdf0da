import path from 'node:path';
import geodesic from 'geographiclib-geodesic';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listUtilityKinds } from '@/db/catalogues';
import { closeDb, getDb } from '@/db/client';
import { getProject, updateProject, type Project } from '@/db/projects';
import { listAnchorRoutes } from '@/db/record-anchors';
import { listTestPits, listTestPitsOnSection, listUtilityCrossings, listUtilityCrossingsOnSection } from '@/db/test-pits';
import { AppError } from '@/lib/api/errors';
import type { Principal } from '@/lib/auth/principal';
import { utilityFindings } from '@/lib/services/checks/utilities';
import { importPlan } from '@/lib/services/planned';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import {
  createTestPit, createUtilityCrossing, editTestPit, editUtilityCrossing, pitsFromUploadSchema, removeTestPit, removeUtilityCrossing, testPitPatchSchema, testPitSchema,
  testPitsFromUpload, utilityCrossingPatchSchema, utilityCrossingSchema,
} from '@/lib/services/test-pits';
import { receiveUpload } from '@/lib/services/uploads';
import { count, makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf } from '../helpers/upload-form';

// Test pits and the utilities found by them: typed, from GPX waypoints and survey CSV points marked as pits,
// and the clearance check. Positions drawn with GeographicLib's direct problem [GeographicLib].
process.env.STORAGE_DIR = path.resolve(__dirname, '../../.data/test-storage-pits');
const G = geodesic.Geodesic.WGS84;
const db = getDb();
const ORIGIN: [number, number] = [9.161, 52.131];
const at = (s: number, left = 0): [number, number] => {
  const p = G.Direct(ORIGIN[1], ORIGIN[0], 90, s);
  if (!left) return [p.lon2!, p.lat2!];
  const q = G.Direct(p.lat2!, p.lon2!, p.azi2! - 90, left);
  return [q.lon2!, q.lat2!];
};
const design = JSON.stringify({ type: 'Feature', properties: { route_id: 'T-1', street: 'Spade Street' }, geometry: { type: 'LineString', coordinates: [at(0), at(150)] } });

let surveyor: Principal;
let owner: Principal;
let other: Principal;
let project: Project;
let otherProject: Project;
let t1: string;
let gas: string;
let water: string;

async function upload(name: string, text: string, fields: Record<string, string> = {}) {
  const form = await formOf([{ name, bytes: text }], fields);
  try {
    return (await receiveUpload(db, surveyor, project, form)).upload;
  } finally {
    await form.cleanup();
  }
}
const issues = (schema: { safeParse: (v: unknown) => { success: boolean; error?: { issues: { path: PropertyKey[]; message: string }[] } } }, v: unknown) => {
  const r = schema.safeParse(v);
  expect(r.success).toBe(false);
  return r.error!.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
};

beforeAll(async () => {
  const admin = await makePrincipal(db, 'admin', 'contractor');
  surveyor = await makePrincipal(db, 'surveyor', 'contractor', admin.organisationName);
  const ownerOrg = await registerPartner(db, admin, `Pit owner ${Date.now()}`);
  owner = await makePrincipal(db, 'engineer', 'owner', ownerOrg);
  const created = await createProject(db, admin, createProjectSchema.parse({ name: 'Pits', partnerOrganisation: ownerOrg, timeZone: 'Europe/Berlin' }));
  await updateProject(db, created.id, { records: { minClearanceM: 0.3 } });
  project = (await getProject(db, created.id))!;
  const form = await formOf([{ name: 'design.geojson', bytes: design }]);
  await importPlan(db, admin, project, form);
  await form.cleanup();
  t1 = (await listAnchorRoutes(db, project.id))[0].id;
  const kinds = await listUtilityKinds(db, project.id);
  gas = kinds.find((k) => k.key === 'gas')!.id;
  water = kinds.find((k) => k.key === 'water')!.id;
  const otherAdmin = await makePrincipal(db, 'admin', 'contractor');
  other = await makePrincipal(db, 'surveyor', 'contractor', otherAdmin.organisationName);
  otherProject = (await getProject(db, (await createProject(db, otherAdmin, createProjectSchema.parse({ name: 'Other pits', partnerOrganisation: await registerPartner(db, otherAdmin, `Other pit owner ${Date.now()}`) }))).id))!;
});
afterAll(() => closeDb());

describe('test pits', () => {
  it('stores a typed pit with an audit entry, and edits and deletes it', async () => {
    const pit = await createTestPit(db, surveyor, project, testPitSchema.parse({ routeId: t1, chainageM: 30, name: 'TP-1', dugOn: '2026-11-02', method: 'vacuum', depthM: 0.9, findings: 'gas main at 0.7 m' }));
    expect(pit).toMatchObject({ routeRef: 'T-1', chainageM: 30, name: 'TP-1', dugOn: '2026-11-02', method: 'vacuum', depthM: 0.9, crossingCount: 0 });
    expect((await db('audit_log').where({ object_id: pit.id, action: 'create' }).first()).after).toMatchObject({ name: 'TP-1', method: 'vacuum' });
    const moved = await editTestPit(db, surveyor, project, pit.id, testPitPatchSchema.parse({ lon: at(35, 1)[0], lat: at(35, 1)[1], depthM: 1.1 }));
    expect(moved.chainageM).toBeCloseTo(35, 1);
    expect(moved.offsetM).toBeCloseTo(1, 1);
    expect(moved.depthM).toBe(1.1);
    expect((await db('audit_log').where({ object_id: pit.id, action: 'update' }).first()).before).toMatchObject({ depthM: 0.9 });
    await removeTestPit(db, surveyor, project, pit.id);
    expect(await db('test_pits').where({ id: pit.id }).first()).toBeUndefined();
    expect(await db('audit_log').where({ object_id: pit.id, action: 'delete' }).first()).toBeDefined();
  });

  it('refuses bad fields with their messages, the owner\'s people and other projects\' pits', async () => {
    expect(issues(testPitSchema, { routeId: t1, chainageM: 5, method: 'excavator' })).toContain('method: Pick how the pit was dug: by hand, by vacuum or otherwise.');
    expect(issues(testPitSchema, { routeId: t1, chainageM: 5, depthM: 40 })).toContain('depthM: The pit depth must be at most 10 m: depths are in metres.');
    expect(issues(testPitSchema, { routeId: t1, chainageM: 5, dugOn: '2026-13-01' })).toContain('dugOn: Give the day dug as YYYY-MM-DD.');
    expect(issues(testPitSchema, { routeId: t1, chainageM: 5, dugOn: '1970-01-01' })).toContain('dugOn: The day dug cannot be before 1990-01-01.');
    const rows = await count(db, 'test_pits');
    const err = await createTestPit(db, owner, project, testPitSchema.parse({ routeId: t1, chainageM: 5 })).catch((e) => e);
    expect(err.code).toBe('forbidden');
    const pit = await createTestPit(db, surveyor, project, testPitSchema.parse({ routeId: t1, chainageM: 5 }));
    expect((await editTestPit(db, other, otherProject, pit.id, { name: 'x' }).catch((e) => e)).code).toBe('not_found');
    expect((await removeTestPit(db, other, otherProject, pit.id).catch((e) => e)).code).toBe('not_found');
    expect(await count(db, 'test_pits')).toBe(rows + 1);
  });

  it('takes pits from GPX waypoints whose name or type marks them, once', async () => {
    const wpt = (s: number, name: string, type: string, t: string) => `<wpt lat="${at(s, 2)[1].toFixed(8)}" lon="${at(s, 2)[0].toFixed(8)}"><time>${t}</time><name>${name}</name><desc>${name} dug by hand</desc><type>${type}</type></wpt>`;
    const gpx = `<?xml version="1.0" encoding="UTF-8"?><gpx version="1.1" creator="tests" xmlns="http://www.topografix.com/GPX/1/1">${wpt(60, 'PIT 1', '', '2026-11-05T23:30:00Z')}${wpt(80, 'Hydrant', 'other', '2026-11-05T10:00:00Z')}${wpt(100, 'W7', 'pit', '2026-11-06T08:00:00Z')}</gpx>`;
    const u = await upload('pits.gpx', gpx, { content: 'test_pits' });
    const rows = await count(db, 'test_pits');
    const none = await testPitsFromUpload(db, surveyor, project, u.id, pitsFromUploadSchema.parse({ code: 'TP' })).catch((e) => e);
    expect(none.message).toMatch(/^No point of this upload is marked TP \(its codes: other, pit\)\.$/);
    const out = await testPitsFromUpload(db, surveyor, project, u.id, pitsFromUploadSchema.parse({ code: 'PIT' }));
    expect(out.stored).toBe(2);
    // 23:30 UTC on 5 November is 00:30 on the 6th on the project's clock (Berlin, CET)
    expect(out.pits.map((p) => [p.name, Math.round(p.chainageM), p.dugOn, p.method, p.findings, p.uploadId])).toEqual([
      ['PIT 1', 60, '2026-11-06', 'hand_dug', 'PIT 1 dug by hand', u.id],
      ['W7', 100, '2026-11-06', 'hand_dug', 'W7 dug by hand', u.id],
    ]);
    expect(out.pits[0].offsetM).toBeCloseTo(2, 1);
    const again = await testPitsFromUpload(db, surveyor, project, u.id, pitsFromUploadSchema.parse({ code: 'PIT' })).catch((e) => e);
    expect(again.code).toBe('conflict');
    expect(await count(db, 'test_pits')).toBe(rows + 2);
    expect((await db('audit_log').where({ object_id: u.id, action: 'import_upload', object_type: 'test_pit' }).first()).after).toMatchObject({ code: 'PIT', count: 2 });
  });

  it('takes pits from survey CSV points coded as pits (grouped into a line by their code), all or nothing', async () => {
    const p = (s: number, left = 0) => at(s, left);
    const csv = ['pt,lat,lon,code', `101,${p(110)[1]},${p(110)[0]},PIT`, `102,${p(120)[1]},${p(120)[0]},EDGE`, `103,${p(130)[1]},${p(130)[0]},PIT`, `104,${p(140)[1]},${p(140)[0]},EDGE`].join('\n') + '\n';
    const u = await upload('shots.csv', csv, { surveyDate: '2026-11-04' });
    const out = await testPitsFromUpload(db, surveyor, project, u.id, pitsFromUploadSchema.parse({ code: 'pit' }));
    expect(out.pits.map((x) => [x.name, Math.round(x.chainageM), x.dugOn])).toEqual([
      ['101', 110, '2026-11-04'],
      ['103', 130, '2026-11-04'],
    ]);
    const far = ['pt,lat,lon,code', `1,${p(20)[1]},${p(20)[0]},PIT`, `2,${p(50, 400)[1]},${p(50, 400)[0]},PIT`].join('\n') + '\n';
    const u2 = await upload('far.csv', far);
    const rows = await count(db, 'test_pits');
    const err = await testPitsFromUpload(db, surveyor, project, u2.id, pitsFromUploadSchema.parse({ code: 'PIT' })).catch((e) => e);
    expect(err).toBeInstanceOf(AppError);
    expect(err.message).toMatch(/^1 marked point cannot be placed; nothing was stored\. point 1\.2 \(2\): That position is 400 m from the nearest route/);
    expect(await count(db, 'test_pits')).toBe(rows);
  });
});

describe('utility crossings', () => {
  it('stores a crossing found in a pit, warns when the clearance is below the minimum, and the check finds it', async () => {
    const pit = await createTestPit(db, surveyor, project, testPitSchema.parse({ routeId: t1, chainageM: 70, name: 'TP-7' }));
    const ok = await createUtilityCrossing(db, surveyor, project, utilityCrossingSchema.parse({ routeId: t1, chainageM: 70, pitId: pit.id, utilityKindId: water, owner: 'Quill Water', depthM: 0.9, clearanceM: 0.35, method: 'test_pit', foundOn: '2026-11-02' }));
    expect(ok.warning).toBeNull();
    expect(ok.crossing).toMatchObject({ pitName: 'TP-7', utilityKey: 'water', utilityLabel: 'Water', clearanceM: 0.35 });
    const close = await createUtilityCrossing(db, surveyor, project, utilityCrossingSchema.parse({ routeId: t1, chainageM: 90, utilityKindId: gas, owner: 'Fen Gas', depthM: 0.6, clearanceM: 0.12, method: 'gpr' }));
    expect(close.warning).toBe("Clearance 0.12 m to the gas is below the project's minimum of 0.30 m.");
    expect((await db('audit_log').where({ object_id: close.crossing.id, action: 'create' }).first()).after).toMatchObject({ utility: 'Gas', clearanceM: 0.12 });
    const findings = await utilityFindings(db, project);
    expect(findings).toHaveLength(1);
    expect(findings[0]).toMatchObject({ check: 'clearance_below_minimum', recordId: close.crossing.id, routeRef: 'T-1', fromChainageM: 90, toChainageM: 90 });
    expect(findings[0].message).toBe('Gas (Fen Gas) at 90.0 m on T-1: clearance 0.12 m, below the minimum 0.30 m.');
    expect((await listTestPits(db, project.id)).find((p) => p.id === pit.id)!.crossingCount).toBe(1);
    // raised to a safe clearance, the finding goes
    const fixed = await editUtilityCrossing(db, surveyor, project, close.crossing.id, utilityCrossingPatchSchema.parse({ clearanceM: 0.32, note: 'measured again in a pit' }));
    expect(fixed.warning).toBeNull();
    expect(await utilityFindings(db, project)).toHaveLength(0);
    expect((await db('audit_log').where({ object_id: close.crossing.id, action: 'update' }).first()).before).toMatchObject({ clearanceM: 0.12 });
    await editUtilityCrossing(db, surveyor, project, close.crossing.id, { clearanceM: 0.12 });
    // deleting the pit keeps the utility found in it, unlinked
    await removeTestPit(db, surveyor, project, pit.id);
    expect((await listUtilityCrossings(db, project.id)).find((c) => c.id === ok.crossing.id)!.pitId).toBeNull();
  });

  it('refuses bad fields, kinds and pits of other projects, the owner\'s people; nothing half-stored', async () => {
    expect(issues(utilityCrossingSchema, { routeId: t1, chainageM: 5, utilityKindId: gas, method: 'dowsing' })).toContain('method: Pick how it was found: radar, test pit, records or otherwise.');
    expect(issues(utilityCrossingSchema, { routeId: t1, chainageM: 5, method: 'gpr' })).toContain('utilityKindId: Pick the kind of utility.');
    expect(issues(utilityCrossingSchema, { routeId: t1, chainageM: 5, utilityKindId: gas, method: 'gpr', clearanceM: -0.1 })).toContain('clearanceM: The clearance must be at least 0 m.');
    const rows = await count(db, 'utility_crossings');
    const audit = await count(db, 'audit_log');
    const foreignKind = (await listUtilityKinds(db, otherProject.id))[0].id;
    const e1 = await createUtilityCrossing(db, surveyor, project, utilityCrossingSchema.parse({ routeId: t1, chainageM: 5, utilityKindId: foreignKind, method: 'gpr' })).catch((e) => e);
    expect(e1.message).toBe("Pick a kind of utility from this project's catalogue.");
    const e2 = await createUtilityCrossing(db, surveyor, project, utilityCrossingSchema.parse({ routeId: t1, chainageM: 5, utilityKindId: gas, method: 'gpr', pitId: '00000000-0000-4000-8000-000000000000' })).catch((e) => e);
    expect(e2.message).toBe('Pick a test pit of this project, or none.');
    const e3 = await createUtilityCrossing(db, owner, project, utilityCrossingSchema.parse({ routeId: t1, chainageM: 5, utilityKindId: gas, method: 'gpr' })).catch((e) => e);
    expect(e3.code).toBe('forbidden');
    expect(await count(db, 'utility_crossings')).toBe(rows);
    expect(await count(db, 'audit_log')).toBe(audit);
    const c = (await listUtilityCrossings(db, project.id))[0];
    expect((await editUtilityCrossing(db, other, otherProject, c.id, { owner: 'x' }).catch((e) => e)).code).toBe('not_found');
    expect((await removeUtilityCrossing(db, other, otherProject, c.id).catch((e) => e)).code).toBe('not_found');
  });

  it('shows pits and crossings on the section whose stretch holds them', async () => {
    const section = { projectId: project.id, plannedRouteRef: 'T-1', fromChainageM: 85, toChainageM: 135 };
    expect((await listUtilityCrossingsOnSection(db, section)).map((c) => c.chainageM)).toEqual([90]);
    expect((await listTestPitsOnSection(db, section)).map((p) => Math.round(p.chainageM))).toEqual([100, 110, 130]);
  });

  it('deletes a crossing with an audit entry', async () => {
    const c = (await listUtilityCrossings(db, project.id))[0];
    await removeUtilityCrossing(db, surveyor, project, c.id);
    expect(await db('audit_log').where({ object_id: c.id, action: 'delete', object_type: 'utility_crossing' }).first()).toBeDefined();
  });
});
