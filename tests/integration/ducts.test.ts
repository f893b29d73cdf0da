import geodesic from 'geographiclib-geodesic';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { listDuctSizes } from '@/db/catalogues';
import { listDuctBundles, listDuctBundlesOnSection } from '@/db/duct-bundles';
import { getProject, type Project } from '@/db/projects';
import { AppError } from '@/lib/api/errors';
import { byProjectRecord } from '@/lib/api/scopes';
import type { Principal } from '@/lib/auth/principal';
import { ductBundleSchema, ductJointSchema } from '@/lib/records/duct-schemas';
import { ductFindings, installedBundleStretches } from '@/lib/services/checks/ducts';
import { createDuctBundle, createDuctJoint, deleteDuctBundleRecord, deleteDuctJointRecord, ductContinuity, refreshPlannedBundles, updateDuctBundleRecord } from '@/lib/services/duct-bundles';
import { importPlan } from '@/lib/services/planned';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { count, makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf } from '../helpers/upload-form';

// Duct bundles, joints and continuity through the services, on a small design drawn with GeographicLib's
// direct problem: R-1 200 m east (12x7/4), R-2 100 m north (4x7mm), R-3 without ducts, R-4 unreadable.
const G = geodesic.Geodesic.WGS84;
const db = getDb();
const ORIGIN: [number, number] = [9.151, 52.131];
const at = (azi: number, s: number): [number, number] => {
  const p = G.Direct(ORIGIN[1], ORIGIN[0], azi, s);
  return [p.lon2!, p.lat2!];
};

interface Side {
  project: Project;
  admin: Principal;
  engineer: Principal;
  surveyor: Principal;
  routes: Map<string, string>;
}
let mine: Side;
let other: Side;
let owner: Principal;
let maintenance: Principal;

async function makeSide(name: string, origin = ORIGIN): Promise<Side & { partner: string }> {
  const admin = await makePrincipal(db, 'admin', 'contractor');
  const engineer = await makePrincipal(db, 'engineer', 'contractor', admin.organisationName);
  const surveyor = await makePrincipal(db, 'surveyor', 'contractor', admin.organisationName);
  const partner = await registerPartner(db, admin, `${name} owner ${Date.now()}`);
  const project = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: `${name} ${Date.now()}`, partnerOrganisation: partner }))).id))!;
  const f = (ref: string, bundle: string | undefined, pts: [number, number][]) => ({ type: 'Feature', properties: { route_id: ref, street: 'Duct Lane', type: 'street', ...(bundle ? { bundle } : {}) }, geometry: { type: 'LineString', coordinates: pts } });
  const off = (p: [number, number]) => [p[0] + origin[0] - ORIGIN[0], p[1] + origin[1] - ORIGIN[1]] as [number, number];
  const design = {
    type: 'FeatureCollection',
    features: [
      f('R-1', '12x7/4', [off(at(90, 0)), off(at(90, 200))]),
      f('R-2', '4x7mm', [off(at(0, 0)), off(at(0, 100))]),
      f('R-3', undefined, [off(at(180, 0)), off(at(180, 50))]),
      f('R-4', 'plenty of ducts', [off(at(270, 0)), off(at(270, 50))]),
    ],
  };
  const form = await formOf([{ name: 'design.geojson', bytes: JSON.stringify(design) }], { mapping: JSON.stringify({ ref: 'route_id', street: 'street', ducts: 'bundle', kind: 'type' }) });
  try {
    await importPlan(db, engineer, project, form);
  } finally {
    await form.cleanup();
  }
  const routes = new Map<string, string>((await db('planned_routes').where({ project_id: project.id }).select('ref', 'id')).map((r: { ref: string; id: string }) => [r.ref, r.id]));
  return { project, admin, engineer, surveyor, routes, partner };
}

const TIA = ['blue', 'orange', 'green', 'brown', 'slate', 'white', 'red', 'black', 'yellow', 'violet', 'rose', 'aqua'];
let size74: string;
let size1410: string;

/** An installed bundle's input: n ducts of 7/4 mm coloured 1…n unless `colours` says otherwise. */
const bundleInput = (route: string, from: number, to: number, n = 12, colours?: number[], extra: Record<string, unknown> = {}) =>
  ductBundleSchema.parse({
    routeId: mine.routes.get(route),
    fromChainageM: from,
    toChainageM: to,
    ducts: Array.from({ length: n }, (_, i) => ({ ductSizeId: size74, colourPosition: colours?.[i] ?? i + 1, purpose: i < 2 ? 'feeder' : i < 10 ? 'distribution' : 'spare' })),
    tracerWire: true,
    warningTape: true,
    protectiveFill: false,
    ...extra,
  });

/** A refusal: its code and message, and not one row or audit entry more. */
async function refused(work: () => Promise<unknown>, code: string, message: RegExp) {
  const before = [await count(db, 'duct_bundles'), await count(db, 'duct_bundle_ducts'), await count(db, 'duct_joints'), await count(db, 'audit_log')];
  const err = (await work().catch((e: unknown) => e)) as AppError;
  expect(err).toBeInstanceOf(AppError);
  expect(err.code).toBe(code);
  expect(err.message).toMatch(message);
  expect([await count(db, 'duct_bundles'), await count(db, 'duct_bundle_ducts'), await count(db, 'duct_joints'), await count(db, 'audit_log')]).toEqual(before);
}

const lastAudit = async (objectId: string) => db('audit_log').where({ object_id: objectId }).orderBy('id', 'desc').first();

beforeAll(async () => {
  const m = await makeSide('Ducts');
  mine = m;
  owner = await makePrincipal(db, 'owner', 'owner', m.partner);
  maintenance = await makePrincipal(db, 'maintenance', 'owner', m.partner);
  other = await makeSide('Other ducts', [ORIGIN[0] + 0.05, ORIGIN[1]]);
  const sizes = await listDuctSizes(db, mine.project.id);
  size74 = sizes.find((s) => s.outerMm === 7 && s.innerMm === 4)!.id;
  size1410 = sizes.find((s) => s.outerMm === 14 && s.innerMm === 10)!.id;
});

afterAll(async () => {
  await closeDb();
});

describe('planned bundles from the plan', () => {
  it("derives one bundle per route from its ducts attribute, coloured in the project's sequence", async () => {
    // the plan's import already derived them (importPlan refreshes the planned bundles in its transaction)
    const r = await refreshPlannedBundles(db, mine.engineer, mine.project);
    expect(r).toMatchObject({ created: 0, removed: 0, kept: 2 });
    expect(r.unreadable).toEqual([{ ref: 'R-4', message: expect.stringMatching(/'plenty of ducts' is not a duct size/) }]);
    const planned = await listDuctBundles(db, mine.project.id, { kind: 'planned' });
    expect(planned.map((b) => [b.routeRef, b.summary, b.plannedSpec])).toEqual([
      ['R-1', '12 × 7/4 mm', '12x7/4'],
      // a plan giving the outer diameter only takes the catalogue's common 7 mm size (7/4 before 7/3.5)
      ['R-2', '4 × 7/4 mm', '4x7mm'],
    ]);
    const r1 = planned[0];
    expect(r1.fromChainageM).toBe(0);
    expect(r1.toChainageM).toBeCloseTo(200, 1);
    expect(r1.ducts.map((d) => d.colourLabel)).toEqual(TIA);
    expect(r1.ducts.every((d) => d.ductSizeId === size74 && d.purpose === null)).toBe(true);
    expect([r1.tracerWire, r1.warningTape, r1.protectiveFill]).toEqual([null, null, null]);
    const audit = await db('audit_log').where({ project_id: mine.project.id, object_type: 'duct_bundle', action: 'refresh_planned' });
    expect(audit).toHaveLength(1);
    expect(audit[0].after).toEqual({ created: 2, removed: 0, kept: 0 });
  });

  it('keeps unchanged planned bundles on a second refresh, without an audit entry', async () => {
    const audit = await count(db, 'audit_log');
    expect(await refreshPlannedBundles(db, mine.engineer, mine.project)).toMatchObject({ created: 0, removed: 0, kept: 2 });
    expect(await count(db, 'audit_log')).toBe(audit);
  });
});

let first: string;
let second: string;

describe('installed bundles', () => {
  it('records a bundle with sizes from the catalogue, colours resolved and stored, and an audit entry', async () => {
    const b = await createDuctBundle(db, mine.surveyor, mine.project, bundleInput('R-1', 0, 60, 12, undefined, { note: 'laid by crew 2' }));
    first = b.id;
    expect(b).toMatchObject({ kind: 'installed', routeRef: 'R-1', fromChainageM: 0, toChainageM: 60, tracerWire: true, warningTape: true, protectiveFill: false, note: 'laid by crew 2', summary: '12 × 7/4 mm' });
    expect(b.ducts[0]).toEqual({ position: 1, ductSizeId: size74, outerMm: 7, innerMm: 4, colourPosition: 1, colourName: 'blue', colourHex: '#1f5fbf', colourMarking: null, colourLabel: 'blue', purpose: 'feeder' });
    expect(b.ducts.map((d) => d.colourLabel)).toEqual(TIA);
    const a = await lastAudit(b.id);
    expect(a).toMatchObject({ action: 'create', object_type: 'duct_bundle', actor_user_id: mine.surveyor.id });
    expect(a.after).toMatchObject({ routeRef: 'R-1', ducts: '12 × 7/4 mm', tracerWire: true });
  });

  it('takes custom sizes and colours 13–24 with the stripe', async () => {
    const input = bundleInput('R-2', 0, 40, 2, [13, 14]);
    input.ducts[1] = { outerMm: 12.5, innerMm: 9, colourPosition: 14, purpose: 'drop' };
    const b = await createDuctBundle(db, mine.engineer, mine.project, input);
    expect(b.ducts.map((d) => [d.colourLabel, d.ductSizeId, d.outerMm, d.innerMm])).toEqual([
      ['blue with stripe', size74, 7, 4],
      ['orange with stripe', null, 12.5, 9],
    ]);
    expect(b.summary).toBe('1 × 7/4 mm + 1 × 12.5/9 mm');
  });

  it.each([
    [{ routeId: 'nope' }, 'routeId', 'Pick the route.'],
    [{ fromChainageM: 80, toChainageM: 60 }, 'toChainageM', 'The stretch must end after it starts (to chainage above from chainage).'],
    [{ fromChainageM: -1 }, 'fromChainageM', /A chainage must be at least 0 m/],
    [{ ducts: [] }, 'ducts', 'Add at least one duct.'],
    [{ ducts: [{ colourPosition: 1, purpose: 'feeder' }] }, 'ducts.0.outerMm', 'Pick a size from the catalogue, or give the outer diameter.'],
    [{ ducts: [{ outerMm: 7, colourPosition: 1, purpose: 'feeder' }] }, 'ducts.0.innerMm', 'Give the inner diameter of the custom size.'],
    [{ ducts: [{ outerMm: 7, innerMm: 7, colourPosition: 1, purpose: 'feeder' }] }, 'ducts.0.innerMm', 'The inner diameter must be below the outer.'],
    [{ ducts: [{ outerMm: 700, innerMm: 7, colourPosition: 1, purpose: 'feeder' }] }, 'ducts.0.outerMm', 'The outer diameter must be at most 100 mm (a microduct).'],
    [{ ducts: [{ outerMm: 7, innerMm: 4, colourPosition: 0, purpose: 'feeder' }] }, 'ducts.0.colourPosition', 'Pick the colour.'],
    [{ ducts: [{ outerMm: 7, innerMm: 4, colourPosition: 1, purpose: 'backbone' }] }, 'ducts.0.purpose', 'Pick the purpose: feeder, distribution, drop or spare.'],
    [{ tracerWire: undefined }, 'tracerWire', 'Say whether a tracer wire was laid.'],
    [{ note: 'x'.repeat(2001) }, 'note', 'Keep the note under 2,000 characters.'],
  ])('refuses a bad field (%j): %s', (patch, path, message) => {
    const base = { routeId: mine.routes.get('R-1'), fromChainageM: 100, toChainageM: 120, ducts: [{ ductSizeId: size74, colourPosition: 1, purpose: 'feeder' }], tracerWire: true, warningTape: false, protectiveFill: false };
    const r = ductBundleSchema.safeParse({ ...base, ...patch });
    expect(r.success).toBe(false);
    const issue = r.error!.issues.find((i) => i.path.join('.') === path);
    expect(issue, JSON.stringify(r.error!.issues)).toBeDefined();
    if (typeof message === 'string') expect(issue!.message).toBe(message);
    else expect(issue!.message).toMatch(message);
  });

  it('refuses what only the server can check, storing nothing', async () => {
    await refused(() => createDuctBundle(db, mine.surveyor, mine.project, bundleInput('R-1', 100, 120, 1, [25])), 'invalid', /Duct 1: the sequence TIA-598 \(12 colours\) names colours 1–24/);
    const foreignSize = (await listDuctSizes(db, other.project.id))[0].id;
    const withForeign = bundleInput('R-1', 100, 120, 1);
    withForeign.ducts[0].ductSizeId = foreignSize;
    await refused(() => createDuctBundle(db, mine.surveyor, mine.project, withForeign), 'invalid', /Duct 1: that size is not in this project's catalogue/);
    await refused(() => createDuctBundle(db, mine.surveyor, mine.project, bundleInput('R-1', 150, 260)), 'invalid', /Route R-1 is 200\.\d m long: the stretch cannot end at 260 m/);
    await refused(() => createDuctBundle(db, mine.surveyor, mine.project, { ...bundleInput('R-1', 0, 10), routeId: other.routes.get('R-1')! }), 'invalid', /That route is not in this project/);
    await refused(() => createDuctBundle(db, mine.surveyor, mine.project, bundleInput('R-1', 50, 80)), 'conflict', /Route R-1 already has an installed bundle from 0\.0 m to 60\.0 m/);
  });

  it('lets only the contractor’s writers record: the owner’s people and maintenance get 403, storing nothing', async () => {
    await refused(() => createDuctBundle(db, owner, mine.project, bundleInput('R-1', 100, 120)), 'forbidden', /Your role \(owner\) may not do this/);
    await refused(() => createDuctBundle(db, maintenance, mine.project, bundleInput('R-1', 100, 120)), 'forbidden', /Your role \(maintenance\)/);
    // an admin of another contractor is the right role on the wrong side
    await refused(() => createDuctBundle(db, other.admin, mine.project, bundleInput('R-1', 100, 120)), 'forbidden', /Only the contractor's people/);
  });

  it('edits a bundle (stretch, ducts, flags) with before and after in the audit log', async () => {
    const b = await createDuctBundle(db, mine.surveyor, mine.project, bundleInput('R-1', 60, 140, 12));
    second = b.id;
    const changed = await updateDuctBundleRecord(db, mine.engineer, mine.project, b.id, bundleInput('R-1', 60, 150, 12, [1, 2, 4, 3, 5, 6, 7, 8, 9, 10, 11, 12], { protectiveFill: true }));
    expect(changed.toChainageM).toBe(150);
    expect(changed.protectiveFill).toBe(true);
    expect(changed.ducts.slice(2, 4).map((d) => d.colourLabel)).toEqual(['brown', 'green']);
    const a = await lastAudit(b.id);
    expect(a.action).toBe('update');
    expect(a.before).toMatchObject({ toChainageM: 140, protectiveFill: false });
    expect(a.after).toMatchObject({ toChainageM: 150, protectiveFill: true });
    expect(a.after.colours).toMatch(/^blue, orange, brown, green, slate/);
  });

  it('refuses to edit or delete a planned bundle by hand, and another project’s bundle is not found', async () => {
    const planned = (await listDuctBundles(db, mine.project.id, { kind: 'planned' }))[0];
    await refused(() => updateDuctBundleRecord(db, mine.engineer, mine.project, planned.id, bundleInput('R-1', 0, 10)), 'conflict', /A planned bundle comes from the plan's ducts attribute \(12x7\/4\)/);
    await refused(() => deleteDuctBundleRecord(db, mine.engineer, mine.project, planned.id), 'conflict', /not deleted by hand/);
    await refused(() => updateDuctBundleRecord(db, other.engineer, other.project, first, bundleInput('R-1', 0, 10)), 'not_found', /No such duct bundle/);
    const scope = byProjectRecord('duct_bundles', 'bundleId');
    expect(await scope({ projectId: mine.project.id, bundleId: first }, db)).toEqual({ projectId: mine.project.id });
    expect(await scope({ projectId: other.project.id, bundleId: first }, db)).toBeUndefined();
  });

  it('lists the bundles on a section’s stretch, planned and installed, and the installed stretches for the coverage check', async () => {
    const on = await listDuctBundlesOnSection(db, { projectId: mine.project.id, plannedRouteRef: 'R-1', fromChainageM: 50, toChainageM: 70 });
    expect(on.map((b) => [b.kind, b.fromChainageM])).toEqual([
      ['planned', 0],
      ['installed', 0],
      ['installed', 60],
    ]);
    expect(await listDuctBundlesOnSection(db, { projectId: mine.project.id, plannedRouteRef: null, fromChainageM: 0, toChainageM: 70 })).toEqual([]);
    expect(await installedBundleStretches(db, mine.project.id)).toEqual([
      { routeId: mine.routes.get('R-1'), routeRef: 'R-1', fromChainageM: 0, toChainageM: 60 },
      { routeId: mine.routes.get('R-1'), routeRef: 'R-1', fromChainageM: 60, toChainageM: 150 },
      { routeId: mine.routes.get('R-2'), routeRef: 'R-2', fromChainageM: 0, toChainageM: 40 },
    ]);
  });
});

describe('continuity and joints', () => {
  it('finds the break where ducts 3 and 4 swap colours with no joint, and compares each stretch with the plan', async () => {
    const routes = await ductContinuity(db, mine.project.id);
    const r1 = routes.find((r) => r.routeRef === 'R-1')!;
    expect(r1.breaks).toHaveLength(1);
    expect(r1.breaks[0]).toMatchObject({ fromChainageM: 60, toChainageM: 60, beforeBundleId: first, afterBundleId: second });
    expect(r1.breaks[0].message).toBe('At 60.0 m: duct 3 is green before and brown after; duct 4 is brown before and green after, with no joint or connector recorded there.');
    expect(r1.stretches.map((s) => s.status)).toEqual(['matches', 'matches']);
    const r2 = routes.find((r) => r.routeRef === 'R-2')!;
    expect(r2.stretches[0]).toMatchObject({ status: 'differs', countDiffers: true, sizesDiffer: true, planned: '4 × 7/4 mm', installed: '1 × 7/4 mm + 1 × 12.5/9 mm' });
    const findings = await ductFindings(db, mine.project);
    expect(findings).toEqual([
      {
        check: 'continuity_break',
        routeId: mine.routes.get('R-1'),
        routeRef: 'R-1',
        fromChainageM: 60,
        toChainageM: 60,
        message: expect.stringMatching(/^R-1: At 60\.0 m: duct 3 is green/),
        href: `/projects/${mine.project.id}/records/ducts#bundle-${second}`,
        recordId: second,
      },
    ]);
  });

  it('a connector at the boundary for ducts 3 and 4 mends the break and is counted; deleting it brings the break back', async () => {
    const j = await createDuctJoint(db, mine.surveyor, mine.project, ductJointSchema.parse({ routeId: mine.routes.get('R-1'), chainageM: 60.4, kind: 'connector', ductPositions: [4, 3, 3], note: 'swap found at the pit' }));
    expect(j).toMatchObject({ routeRef: 'R-1', kind: 'connector', ductPositions: [3, 4], offsetM: 0 });
    expect(j.chainageM).toBeCloseTo(60.4, 6);
    expect((await lastAudit(j.id)).after).toEqual({ routeRef: 'R-1', chainageM: 60.4, kind: 'connector', ductPositions: [3, 4], note: 'swap found at the pit' });
    expect(await ductFindings(db, mine.project)).toEqual([]);
    const r1 = (await ductContinuity(db, mine.project.id)).find((r) => r.routeRef === 'R-1')!;
    expect(r1.connectors).toEqual({ connectors: 1, joints: 0, perDuct: [{ position: 3, count: 1 }, { position: 4, count: 1 }], worstDuct: 1 });
    await deleteDuctJointRecord(db, mine.engineer, mine.project, j.id);
    expect((await lastAudit(j.id)).action).toBe('delete');
    expect(await ductFindings(db, mine.project)).toHaveLength(1);
  });

  it('places a joint from a position, snapped to the route', async () => {
    const p = G.Direct(ORIGIN[1], ORIGIN[0], 90, 120);
    const q = G.Direct(p.lat2!, p.lon2!, 0, 1.5); // 1.5 m north: left of an eastward route
    const j = await createDuctJoint(db, mine.surveyor, mine.project, ductJointSchema.parse({ lon: q.lon2, lat: q.lat2, kind: 'joint', ductPositions: [1] }));
    expect(j.routeRef).toBe('R-1');
    expect(j.chainageM).toBeCloseTo(120, 1);
    expect(j.offsetM).toBeCloseTo(1.5, 1);
    const r1 = (await ductContinuity(db, mine.project.id)).find((r) => r.routeRef === 'R-1')!;
    expect(r1.connectors).toMatchObject({ connectors: 0, joints: 1 });
  });

  it('refuses bad joints with their messages, storing nothing', async () => {
    const base = { routeId: mine.routes.get('R-1'), chainageM: 10, kind: 'joint', ductPositions: [1] };
    const msg = (v: unknown) => ductJointSchema.safeParse(v).error?.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
    expect(msg({ ...base, ductPositions: [] })).toEqual(['ductPositions: Say which ducts are joined.']);
    expect(msg({ ...base, ductPositions: [0] })).toEqual(['ductPositions.0: Duct positions start at 1.']);
    expect(msg({ ...base, kind: 'splice' })).toEqual(['kind: Pick joint or connector.']);
    await refused(() => createDuctJoint(db, mine.surveyor, mine.project, ductJointSchema.parse({ ...base, chainageM: 500 })), 'invalid', /chainage 500 m is beyond its end/);
    await refused(() => createDuctJoint(db, owner, mine.project, ductJointSchema.parse(base)), 'forbidden', /Your role \(owner\)/);
    const j = await createDuctJoint(db, other.surveyor, other.project, ductJointSchema.parse({ ...base, routeId: other.routes.get('R-1') }));
    await refused(() => deleteDuctJointRecord(db, mine.engineer, mine.project, j.id), 'not_found', /No such joint/);
  });

  it('deletes an installed bundle with an audit entry; its ducts go with it', async () => {
    const ducts = await count(db, 'duct_bundle_ducts');
    await deleteDuctBundleRecord(db, mine.engineer, mine.project, second);
    expect(await count(db, 'duct_bundle_ducts')).toBe(ducts - 12);
    const a = await lastAudit(second);
    expect(a.action).toBe('delete');
    expect(a.before).toMatchObject({ routeRef: 'R-1', fromChainageM: 60, toChainageM: 150 });
    expect(await ductFindings(db, mine.project)).toEqual([]);
  });
});
