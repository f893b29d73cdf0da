import path from 'node:path';
import { NextRequest } from 'next/server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { listDuctSizes } from '@/db/catalogues';
import { listCrossingRoutes, listRoadCrossingsOnSection } from '@/db/road-crossings';
import { AppError } from '@/lib/api/errors';
import { byProjectRecord } from '@/lib/api/scopes';
import { roadCrossingPatchSchema, roadCrossingSchema } from '@/lib/records/road-crossing-schema';
import { importPlan } from '@/lib/services/planned';
import { createRoadCrossing, editRoadCrossing, removeRoadCrossing } from '@/lib/services/road-crossings';
import { createToken } from '@/lib/services/tokens';
import { describeAudit } from '@/components/audit-words';
import { GET as listRoute, POST as createRoute } from '@/app/api/projects/[projectId]/road-crossings/route';
import { DELETE as deleteRoute, PATCH as patchRoute } from '@/app/api/projects/[projectId]/road-crossings/[crossingId]/route';
import { count } from '../helpers/fixtures';
import { makeRecordPlan, type RecordPlan } from '../helpers/record-plan';
import { formOf } from '../helpers/upload-form';

process.env.STORAGE_DIR = path.resolve(__dirname, '../../.data/test-storage-crossings');
const db = getDb();
let plan: RecordPlan;
let foreign: RecordPlan;
let size14: string;
let foreignCrossingId: string;

async function refusal(p: Promise<unknown>): Promise<AppError> {
  const err = await p.then(() => null, (e: unknown) => e);
  expect(err).toBeInstanceOf(AppError);
  return err as AppError;
}

/** The zod messages of a body, by field. */
function problems(schema: typeof roadCrossingSchema | typeof roadCrossingPatchSchema, body: unknown): Record<string, string> {
  const r = schema.safeParse(body);
  expect(r.success).toBe(false);
  // the first message of each field: the one a form shows
  const out: Record<string, string> = {};
  for (const i of r.error!.issues) out[i.path.join('.')] ??= i.message;
  return out;
}

beforeAll(async () => {
  plan = await makeRecordPlan(db, 'Crossings', [9.2, 52.2]);
  foreign = await makeRecordPlan(db, 'Crossings elsewhere', [9.3, 52.3]);
  size14 = (await listDuctSizes(db, plan.project.id)).find((s) => s.outerMm === 14 && s.innerMm === 10)!.id;
  foreignCrossingId = (await createRoadCrossing(db, foreign.surveyor, foreign.project, roadCrossingSchema.parse({ routeId: foreign.routes.get('X-1'), built: true }))).id;
});
afterAll(() => closeDb());

describe('road crossings', () => {
  it('lists every crossing route of the plan, none recorded yet: not built', async () => {
    const list = await listCrossingRoutes(db, plan.project.id);
    expect(list.map((c) => [c.routeRef, c.plannedDucts, c.crossing])).toEqual([['X-1', '1x14mm', null], ['X-2', '1x14mm', null], ['X-3', '1x14mm', null]]);
    // 9 m across the street, measured by GeographicLib when the plan was imported
    for (const c of list) expect(c.plannedLengthM).toBeCloseTo(9, 3);
  });

  it('records a built crossing over the whole crossing route, with its ducts from the catalogue, and audits it', async () => {
    const before = await count(db, 'audit_log');
    const c = await createRoadCrossing(db, plan.surveyor, plan.project, roadCrossingSchema.parse({
      routeId: plan.routes.get('X-1'), built: true, builtOn: '2026-11-03', lengthM: 9.4, sawnBeforeMain: true, ductCount: 2, ductSizeId: size14, addressRef: '12 Test Street', note: 'Kerb stone lifted and reset',
    }));
    expect(c).toMatchObject({ routeRef: 'X-1', built: true, builtOn: '2026-11-03', lengthM: 9.4, sawnBeforeMain: true, ductCount: 2, ductSize: '14/10 mm', addressRef: '12 Test Street', fromChainageM: 0, routeRemoved: false });
    expect(c.toChainageM).toBeCloseTo(9, 3);
    expect(await count(db, 'audit_log')).toBe(before + 1);
    const entry = await db('audit_log').where({ object_type: 'road_crossing', object_id: c.id }).first();
    expect(entry.action).toBe('create');
    expect(describeAudit({ objectType: 'road_crossing', action: 'create', before: entry.before, after: entry.after })).toBe('Recorded road crossing X-1 as built on 2026-11-03, 9.4 m, sawn before the lengthways cut, 2 × 14/10 mm ducts.');
    const list = await listCrossingRoutes(db, plan.project.id);
    expect(list.find((x) => x.routeRef === 'X-1')!.crossing!.id).toBe(c.id);
  });

  it('refuses each bad field with its message', async () => {
    const routeId = plan.routes.get('X-2');
    expect(problems(roadCrossingSchema, { built: true })).toEqual({ routeId: 'Pick the crossing route.' });
    expect(problems(roadCrossingSchema, { routeId, lengthM: 900 })).toEqual({ lengthM: 'The measured length must be at most 500 m: a road crossing is a short cut across one street.' });
    expect(problems(roadCrossingSchema, { routeId, lengthM: 'nine' })).toEqual({ lengthM: 'The measured length must be a number of metres.' });
    expect(problems(roadCrossingSchema, { routeId, ductCount: 0 })).toEqual({ ductCount: 'A crossing carries at least one duct (leave it empty when not recorded).' });
    expect(problems(roadCrossingSchema, { routeId, ductCount: 1.5 })).toEqual({ ductCount: 'The number of ducts must be a whole number.' });
    expect(problems(roadCrossingSchema, { routeId, ductSizeId: 'fourteen' })).toEqual({ ductSizeId: 'Pick the duct size from the catalogue.' });
    expect(problems(roadCrossingSchema, { routeId, built: true, builtOn: '2099-01-01' })).toEqual({ builtOn: 'The date built cannot be in the future.' });
    expect(problems(roadCrossingSchema, { routeId, built: true, builtOn: '3.11.2026' })).toEqual({ builtOn: 'Give the date built as YYYY-MM-DD.' });
    expect(problems(roadCrossingSchema, { routeId, built: false, builtOn: '2026-11-03' })).toEqual({ builtOn: 'A crossing not built has no date built: tick "built" or clear the date.' });
    expect(problems(roadCrossingSchema, { routeId, fromChainageM: 5, toChainageM: 2 })).toEqual({ toChainageM: 'The stretch must end after it starts (to chainage above from chainage).' });
    expect(problems(roadCrossingSchema, { routeId, built: 'yes' })).toEqual({ built: 'Say whether the crossing is built (true or false).' });

    const rows = await count(db, 'road_crossings');
    const audits = await count(db, 'audit_log');
    const street = await refusal(createRoadCrossing(db, plan.surveyor, plan.project, roadCrossingSchema.parse({ routeId: plan.routes.get('S-1') })));
    expect([street.code, street.message]).toEqual(['invalid', 'Route S-1 is a street route, not a road crossing: pick one of the plan\'s crossings.']);
    const elsewhere = await refusal(createRoadCrossing(db, plan.surveyor, plan.project, roadCrossingSchema.parse({ routeId: foreign.routes.get('X-2') })));
    expect(elsewhere.details).toEqual([{ path: 'routeId', message: 'Pick a crossing route of this project.' }]);
    const beyond = await refusal(createRoadCrossing(db, plan.surveyor, plan.project, roadCrossingSchema.parse({ routeId, fromChainageM: 0, toChainageM: 30 })));
    expect(beyond.message).toMatch(/^Crossing X-2 is 9\.0 m long: the stretch cannot end at 30 m\.$/);
    const foreignSize = (await listDuctSizes(db, foreign.project.id))[0].id;
    const size = await refusal(createRoadCrossing(db, plan.surveyor, plan.project, roadCrossingSchema.parse({ routeId, ductCount: 1, ductSizeId: foreignSize })));
    expect(size.details).toEqual([{ path: 'ductSizeId', message: 'Pick a duct size of this project\'s catalogue.' }]);
    const twice = await refusal(createRoadCrossing(db, plan.surveyor, plan.project, roadCrossingSchema.parse({ routeId: plan.routes.get('X-1') })));
    expect([twice.code, twice.status, twice.message]).toEqual(['conflict', 409, 'Crossing X-1 already has a record: edit it instead.']);
    // nothing half-stored
    expect([await count(db, 'road_crossings'), await count(db, 'audit_log')]).toEqual([rows, audits]);
  });

  it('edits a record: not built yet, then built with its date; the audit entry keeps before and after', async () => {
    const c = await createRoadCrossing(db, plan.engineer, plan.project, roadCrossingSchema.parse({ routeId: plan.routes.get('X-2'), built: false, note: 'Waiting for the road closure' }));
    expect([c.built, c.builtOn, c.lengthM]).toEqual([false, null, null]);
    const built = await editRoadCrossing(db, plan.surveyor, plan.project, c.id, roadCrossingPatchSchema.parse({ built: true, builtOn: '2026-11-04', lengthM: 8.8, sawnBeforeMain: false }));
    expect(built).toMatchObject({ built: true, builtOn: '2026-11-04', lengthM: 8.8, sawnBeforeMain: false, note: 'Waiting for the road closure' });
    const entry = await db('audit_log').where({ object_type: 'road_crossing', object_id: c.id, action: 'update' }).first();
    expect(entry.before).toMatchObject({ built: false, builtOn: null });
    expect(entry.after).toMatchObject({ built: true, builtOn: '2026-11-04', lengthM: 8.8 });
    expect(describeAudit({ objectType: 'road_crossing', action: 'update', before: entry.before, after: entry.after })).toBe(
      'Changed road crossing X-2: built from no to yes; the date built from nothing to 2026-11-04; the measured length from nothing to 8.8 m; sawn before the lengthways cut from nothing to no.',
    );
    // not built again: the date goes with it
    const undone = await editRoadCrossing(db, plan.surveyor, plan.project, c.id, roadCrossingPatchSchema.parse({ built: false }));
    expect([undone.built, undone.builtOn]).toEqual([false, null]);
    const bad = await refusal(editRoadCrossing(db, plan.surveyor, plan.project, c.id, roadCrossingPatchSchema.parse({ toChainageM: 40 })));
    expect(bad.details).toEqual([{ path: 'toChainageM', message: 'At most 9.0 m on crossing X-2.' }]);
  });

  it('removes a record: the crossing is not built yet again', async () => {
    const c = await createRoadCrossing(db, plan.surveyor, plan.project, roadCrossingSchema.parse({ routeId: plan.routes.get('X-3'), built: true }));
    await removeRoadCrossing(db, plan.surveyor, plan.project, c.id);
    expect((await listCrossingRoutes(db, plan.project.id)).find((x) => x.routeRef === 'X-3')!.crossing).toBeNull();
    const entry = await db('audit_log').where({ object_type: 'road_crossing', object_id: c.id, action: 'delete' }).first();
    expect(describeAudit({ objectType: 'road_crossing', action: 'delete', before: entry.before, after: entry.after })).toBe('Removed the record of road crossing X-3.');
  });

  it('lets the contractor\'s surveyors and engineers write; the owner\'s people and maintenance read only', async () => {
    const body = roadCrossingSchema.parse({ routeId: plan.routes.get('X-3'), built: true });
    for (const who of [plan.owner, plan.maintenance]) {
      const err = await refusal(createRoadCrossing(db, who, plan.project, body));
      expect(err.status).toBe(403);
    }
    const x1 = (await listCrossingRoutes(db, plan.project.id)).find((x) => x.routeRef === 'X-1')!.crossing!;
    expect((await refusal(editRoadCrossing(db, plan.owner, plan.project, x1.id, { note: 'owner' }))).status).toBe(403);
    expect((await refusal(removeRoadCrossing(db, plan.maintenance, plan.project, x1.id))).status).toBe(403);
  });

  it('keeps projects apart: another project\'s crossing is not found', async () => {
    expect((await refusal(editRoadCrossing(db, plan.surveyor, plan.project, foreignCrossingId, { note: 'x' }))).code).toBe('not_found');
    expect((await refusal(removeRoadCrossing(db, plan.surveyor, plan.project, foreignCrossingId))).code).toBe('not_found');
    const scope = byProjectRecord('road_crossings', 'crossingId');
    expect(await scope({ projectId: plan.project.id, crossingId: foreignCrossingId }, db)).toBeUndefined();
    expect(await scope({ projectId: foreign.project.id, crossingId: foreignCrossingId }, db)).toEqual({ projectId: foreign.project.id });
    expect((await listCrossingRoutes(db, plan.project.id)).every((c) => c.crossing === null || c.crossing.projectId === plan.project.id)).toBe(true);
  });

  it('answers through the API: 201, 403 for the owner, 404 for another project\'s crossing, 422 with details', async () => {
    const surveyorToken = (await createToken(db, plan.surveyor, { name: 'crossings' })).secret;
    const ownerToken = (await createToken(db, plan.owner, { name: 'crossings' })).secret;
    const call = (handler: (req: NextRequest, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>, method: string, url: string, token: string, params: Record<string, string>, body?: unknown) =>
      handler(new NextRequest(`http://127.0.0.1${url}`, { method, headers: { authorization: `Bearer ${token}`, 'content-type': 'application/json' }, body: body === undefined ? undefined : JSON.stringify(body) }), { params: Promise.resolve(params) });
    const pid = plan.project.id;
    const base = `/api/projects/${pid}/road-crossings`;
    const list = await call(listRoute, 'GET', base, ownerToken, { projectId: pid });
    expect(list.status).toBe(200);
    expect(((await list.json()) as { crossings: unknown[] }).crossings).toHaveLength(3);
    expect((await call(createRoute, 'POST', base, ownerToken, { projectId: pid }, { routeId: plan.routes.get('X-3'), built: true })).status).toBe(403);
    const bad = await call(createRoute, 'POST', base, surveyorToken, { projectId: pid }, { routeId: plan.routes.get('X-3'), lengthM: -2 });
    expect(bad.status).toBe(422);
    expect(((await bad.json()) as { error: { details: unknown } }).error.details).toEqual([{ path: 'lengthM', message: 'The measured length must be at least 0.1 m.' }]);
    const made = await call(createRoute, 'POST', base, surveyorToken, { projectId: pid }, { routeId: plan.routes.get('X-3'), built: true, builtOn: '2026-11-05' });
    expect(made.status).toBe(201);
    const id = ((await made.json()) as { crossing: { id: string } }).crossing.id;
    const patched = await call(patchRoute, 'PATCH', `${base}/${id}`, surveyorToken, { projectId: pid, crossingId: id }, { lengthM: 9.1 });
    expect([patched.status, ((await patched.json()) as { crossing: { lengthM: number } }).crossing.lengthM]).toEqual([200, 9.1]);
    expect((await call(patchRoute, 'PATCH', `${base}/${foreignCrossingId}`, surveyorToken, { projectId: pid, crossingId: foreignCrossingId }, { lengthM: 9.1 })).status).toBe(404);
    expect((await call(deleteRoute, 'DELETE', `${base}/${id}`, ownerToken, { projectId: pid, crossingId: id })).status).toBe(403);
    expect((await call(deleteRoute, 'DELETE', `${base}/${id}`, surveyorToken, { projectId: pid, crossingId: id })).status).toBe(200);
  });

  it('shows a crossing on its section\'s page, and keeps it, flagged, when a plan revision removes the crossing route', async () => {
    const x1 = (await listCrossingRoutes(db, plan.project.id)).find((x) => x.routeRef === 'X-1')!.crossing!;
    const onSection = await listRoadCrossingsOnSection(db, { projectId: plan.project.id, plannedRouteRef: 'X-1', fromChainageM: 0, toChainageM: 9 });
    expect(onSection.map((c) => c.id)).toEqual([x1.id]);
    expect(await listRoadCrossingsOnSection(db, { projectId: plan.project.id, plannedRouteRef: 'X-3', fromChainageM: 0, toChainageM: 9 })).toEqual([]);

    // the revised design drops X-1 (and X-3, which has no record and so leaves the list)
    const f = (ref: string, type: string, pts: [number, number][]) => ({ type: 'Feature', properties: { route_id: ref, street: 'Test Street', bundle: '1x14mm', type }, geometry: { type: 'LineString', coordinates: pts.map(([e, n]) => plan.at(e, n)) } });
    const form = await formOf([{ name: 'design-rev2.geojson', bytes: JSON.stringify({ type: 'FeatureCollection', features: [f('S-1', 'street', [[0, 0], [200, 0]]), f('X-2', 'road crossing', [[90, 0], [90, -9]])] }) }]);
    try {
      await importPlan(db, plan.engineer, plan.project, form);
    } finally {
      await form.cleanup();
    }
    const list = await listCrossingRoutes(db, plan.project.id);
    expect(list.map((c) => [c.routeRef, c.routeRemoved, c.crossing?.id ?? null])).toEqual([['X-1', true, x1.id], ['X-2', false, expect.any(String)]]);
    const removed = await refusal(createRoadCrossing(db, plan.surveyor, plan.project, roadCrossingSchema.parse({ routeId: plan.routes.get('X-3') })));
    expect(removed.message).toBe('Crossing X-3 was removed by a plan revision: no new record is added to it.');
  });
});
