import { NextRequest } from 'next/server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { listBackfillMaterials } from '@/db/catalogues';
import { updateProject } from '@/db/projects';
import { getProject } from '@/db/projects';
import { listRestorations, listRestorationsOnSection } from '@/db/restorations';
import { AppError } from '@/lib/api/errors';
import { byProjectRecord } from '@/lib/api/scopes';
import { restorationPatchSchema, restorationSchema } from '@/lib/records/restoration-schema';
import { restorationFindings } from '@/lib/services/checks/restoration';
import { createRestoration, editRestoration, removeRestoration } from '@/lib/services/restorations';
import { createToken } from '@/lib/services/tokens';
import { describeAudit } from '@/components/audit-words';
import { GET as listRoute, POST as createRoute } from '@/app/api/projects/[projectId]/restorations/route';
import { DELETE as deleteRoute, PATCH as patchRoute } from '@/app/api/projects/[projectId]/restorations/[restorationId]/route';
import { count } from '../helpers/fixtures';
import { makeRecordPlan, type RecordPlan } from '../helpers/record-plan';

const db = getDb();
let plan: RecordPlan;
let foreign: RecordPlan;
let stone: string;
let foreignId: string;

async function refusal(p: Promise<unknown>): Promise<AppError> {
  const err = await p.then(() => null, (e: unknown) => e);
  expect(err).toBeInstanceOf(AppError);
  return err as AppError;
}

const body = (over: Record<string, unknown> = {}) => restorationSchema.parse({
  routeId: plan.routes.get('S-1'), fromChainageM: 0, toChainageM: 60, restoredAt: '2026-11-03T10:00', backfillMaterialId: stone,
  laidThicknessMm: 40, edgesCleanedAt: '2026-11-03T09:20', surfaceLaidAt: '2026-11-03T09:55', crew: 'North',
  temperatures: [{ measuredAt: '2026-11-03T09:50', tempC: 198 }, { tempC: 191 }], ...over,
});

beforeAll(async () => {
  plan = await makeRecordPlan(db, 'Restorations', [9.4, 52.4]);
  foreign = await makeRecordPlan(db, 'Restorations elsewhere', [9.5, 52.5]);
  stone = (await listBackfillMaterials(db, plan.project.id))[0].id;
  const fStone = (await listBackfillMaterials(db, foreign.project.id))[0].id;
  foreignId = (await createRestoration(db, foreign.surveyor, foreign.project, restorationSchema.parse({ routeId: foreign.routes.get('S-1'), fromChainageM: 0, toChainageM: 20, restoredAt: '2026-11-03T10:00', backfillMaterialId: fStone }))).id;
});
afterAll(() => closeDb());

describe('surface restorations', () => {
  it('records a restoration with its readings, times read on the project\'s clock, defaults from the project, and audits it', async () => {
    const before = await count(db, 'audit_log');
    const r = await createRestoration(db, plan.surveyor, plan.project, body());
    // Europe/Berlin is UTC+1 in November [IANA tz database]
    expect(r).toMatchObject({
      routeRef: 'S-1', fromChainageM: 0, toChainageM: 60, restoredAt: '2026-11-03T09:00:00.000Z', edgesCleanedAt: '2026-11-03T08:20:00.000Z', surfaceLaidAt: '2026-11-03T08:55:00.000Z',
      compactionPasses: 3, requiredThicknessMm: 40, laidThicknessMm: 40, crew: 'North', backfillMaterialId: stone,
    });
    expect(r.temperatures).toEqual([{ measuredAt: '2026-11-03T08:50:00.000Z', tempC: 198 }, { measuredAt: null, tempC: 191 }]);
    expect(r.check).toMatchObject({ verdict: 'pass', late: false, outOfTolerance: false, delayMin: 35 });
    expect(await count(db, 'audit_log')).toBe(before + 1);
    const entry = await db('audit_log').where({ object_type: 'restoration', object_id: r.id }).first();
    expect(entry.after).toMatchObject({ route: 'S-1', restoredAt: '2026-11-03 10:00', temperaturesC: [198, 191], verdict: 'pass' });
    expect(describeAudit({ objectType: 'restoration', action: 'create', before: entry.before, after: entry.after })).toBe('Recorded the restoration of S-1 0–60 m on 2026-11-03 10:00: pass.');
  });

  it('refuses each bad field with its message, storing nothing', async () => {
    const rows = [await count(db, 'restorations'), await count(db, 'restoration_temperatures'), await count(db, 'audit_log')];
    const elsewhere = await refusal(createRestoration(db, plan.surveyor, plan.project, body({ routeId: foreign.routes.get('S-1') })));
    expect(elsewhere.details).toEqual([{ path: 'routeId', message: 'Pick a route of this project.' }]);
    const beyond = await refusal(createRestoration(db, plan.surveyor, plan.project, body({ toChainageM: 400 })));
    expect(beyond.details).toEqual([{ path: 'toChainageM', message: 'At most 200.0 m on route S-1.' }]);
    const fStone = (await listBackfillMaterials(db, foreign.project.id))[0].id;
    const material = await refusal(createRestoration(db, plan.surveyor, plan.project, body({ backfillMaterialId: fStone })));
    expect(material.details).toEqual([{ path: 'backfillMaterialId', message: 'Pick a backfill material of this project\'s catalogue.' }]);
    const unreal = await refusal(createRestoration(db, plan.surveyor, plan.project, body({ restoredAt: '2026-02-30T10:00' })));
    expect(unreal.details).toEqual([{ path: 'restoredAt', message: 'Give a real date and time (YYYY-MM-DDTHH:mm).' }]);
    const reading = await refusal(createRestoration(db, plan.surveyor, plan.project, body({ temperatures: [{ tempC: 190 }, { tempC: 192, measuredAt: '2026-13-01T10:00' }] })));
    expect(reading.details).toEqual([{ path: 'temperatures.1.measuredAt', message: 'Give a real date and time (YYYY-MM-DDTHH:mm).' }]);
    expect([await count(db, 'restorations'), await count(db, 'restoration_temperatures'), await count(db, 'audit_log')]).toEqual(rows);
  });

  it('edits a restoration: readings replaced, the verdict follows; the audit entry keeps before and after', async () => {
    const r = await createRestoration(db, plan.engineer, plan.project, body({ fromChainageM: 60, toChainageM: 120 }));
    const cold = await editRestoration(db, plan.surveyor, plan.project, r.id, restorationPatchSchema.parse({ temperatures: [{ tempC: 193 }, { tempC: 162 }], laidThicknessMm: 35, note: 'Second load cold' }));
    expect(cold.temperatures.map((t) => t.tempC)).toEqual([193, 162]);
    expect(cold.check.verdict).toBe('fail');
    expect(cold.check.reasons.map((x) => x.text)).toEqual(['Laying temperature 162 °C outside 180–210 °C.', 'Laid 35 mm thick, below the required 40 mm.']);
    const entry = await db('audit_log').where({ object_type: 'restoration', object_id: r.id, action: 'update' }).first();
    expect(entry.before).toMatchObject({ temperaturesC: [198, 191], verdict: 'pass' });
    expect(entry.after).toMatchObject({ temperaturesC: [193, 162], laidThicknessMm: 35, verdict: 'fail' });
    expect(describeAudit({ objectType: 'restoration', action: 'update', before: entry.before, after: entry.after })).toBe(
      'Changed the restoration of S-1 60–120 m: the laid thickness from 40 mm to 35 mm; the note from nothing to Second load cold; the laying temperatures from 198, 191 °C to 193, 162 °C; now fail.',
    );
    // the readings untouched when not sent
    const noted = await editRestoration(db, plan.surveyor, plan.project, r.id, restorationPatchSchema.parse({ note: 'Load 2 replaced' }));
    expect(noted.temperatures.map((t) => t.tempC)).toEqual([193, 162]);
    const order = await refusal(editRestoration(db, plan.surveyor, plan.project, r.id, restorationPatchSchema.parse({ edgesCleanedAt: '2026-11-03T11:00' })));
    expect(order.details).toEqual([{ path: 'surfaceLaidAt', message: 'The surface is laid after the edges are cleaned: check the two times.' }]);
  });

  it('finds out-of-tolerance and late restorations as checks, following the project\'s settings', async () => {
    const late = await createRestoration(db, plan.surveyor, plan.project, body({ fromChainageM: 120, toChainageM: 200, edgesCleanedAt: '2026-11-04T12:40', surfaceLaidAt: '2026-11-04T14:50', restoredAt: '2026-11-04T15:00' }));
    expect([late.check.verdict, late.check.late]).toEqual(['warn', true]);
    const findings = await restorationFindings(db, plan.project);
    expect(findings.map((f) => [f.check, f.routeRef, f.fromChainageM, f.toChainageM])).toEqual([
      ['restoration_out_of_tolerance', 'S-1', 60, 120],
      ['restoration_late', 'S-1', 120, 200],
    ]);
    expect(findings[0].message).toBe('Restoration on S-1 60.0–120.0 m: Laying temperature 162 °C outside 180–210 °C. Laid 35 mm thick, below the required 40 mm.');
    expect(findings[1].message).toBe('Restoration on S-1 120.0–200.0 m: Laid 130 min after the edges were cleaned, more than the project\'s 60 min.');
    expect(findings[1].href).toBe(`/projects/${plan.project.id}/records/restoration#restoration-${late.id}`);
    // a wider tolerance and a longer limit: the same records pass those checks
    await updateProject(db, plan.project.id, { records: { layingTempToleranceC: 40, restorationMaxDelayMin: 180 } });
    const wider = (await getProject(db, plan.project.id))!;
    expect((await restorationFindings(db, wider)).map((f) => f.check)).toEqual(['restoration_out_of_tolerance']);
    await updateProject(db, plan.project.id, { records: { layingTempToleranceC: 15, restorationMaxDelayMin: 60 } });
  });

  it('shows a restoration on every section its stretch touches', async () => {
    const on = await listRestorationsOnSection(db, { projectId: plan.project.id, plannedRouteRef: 'S-1', fromChainageM: 50, toChainageM: 70 });
    expect(on.map((r) => [r.fromChainageM, r.check.verdict])).toEqual([[0, 'pass'], [60, 'fail']]);
    expect(await listRestorationsOnSection(db, { projectId: plan.project.id, plannedRouteRef: 'X-1', fromChainageM: 0, toChainageM: 9 })).toEqual([]);
  });

  it('removes a restoration with its readings', async () => {
    const r = await createRestoration(db, plan.surveyor, plan.project, body({ fromChainageM: 190, toChainageM: 200 }));
    const temps = await count(db, 'restoration_temperatures');
    await removeRestoration(db, plan.surveyor, plan.project, r.id);
    expect(await count(db, 'restoration_temperatures')).toBe(temps - 2);
    const entry = await db('audit_log').where({ object_type: 'restoration', object_id: r.id, action: 'delete' }).first();
    expect(describeAudit({ objectType: 'restoration', action: 'delete', before: entry.before, after: entry.after })).toBe('Removed the restoration of S-1 190–200 m.');
  });

  it('lets the contractor\'s surveyors and engineers write; the owner\'s people and maintenance read only', async () => {
    for (const who of [plan.owner, plan.maintenance]) expect((await refusal(createRestoration(db, who, plan.project, body()))).status).toBe(403);
    const first = (await listRestorations(db, plan.project.id))[0];
    expect((await refusal(editRestoration(db, plan.owner, plan.project, first.id, { note: 'x' }))).status).toBe(403);
    expect((await refusal(removeRestoration(db, plan.maintenance, plan.project, first.id))).status).toBe(403);
  });

  it('keeps projects apart: another project\'s restoration is not found', async () => {
    expect((await refusal(editRestoration(db, plan.surveyor, plan.project, foreignId, { note: 'x' }))).code).toBe('not_found');
    expect((await refusal(removeRestoration(db, plan.surveyor, plan.project, foreignId))).code).toBe('not_found');
    const scope = byProjectRecord('restorations', 'restorationId');
    expect(await scope({ projectId: plan.project.id, restorationId: foreignId }, db)).toBeUndefined();
    expect((await listRestorations(db, plan.project.id)).every((r) => r.projectId === plan.project.id)).toBe(true);
  });

  it('answers through the API: 201, 403 for the owner, 404 for another project\'s record, 422 with details', async () => {
    const surveyorToken = (await createToken(db, plan.surveyor, { name: 'restorations' })).secret;
    const ownerToken = (await createToken(db, plan.owner, { name: 'restorations' })).secret;
    const call = (handler: (req: NextRequest, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>, method: string, url: string, token: string, params: Record<string, string>, b?: unknown) =>
      handler(new NextRequest(`http://127.0.0.1${url}`, { method, headers: { authorization: `Bearer ${token}`, 'content-type': 'application/json' }, body: b === undefined ? undefined : JSON.stringify(b) }), { params: Promise.resolve(params) });
    const pid = plan.project.id;
    const base = `/api/projects/${pid}/restorations`;
    const list = await call(listRoute, 'GET', base, ownerToken, { projectId: pid });
    expect(list.status).toBe(200);
    expect(((await list.json()) as { restorations: { check: { verdict: string } }[] }).restorations.map((r) => r.check.verdict)).toEqual(['pass', 'fail', 'warn']);
    const raw = { routeId: plan.routes.get('S-1'), fromChainageM: 10, toChainageM: 30, restoredAt: '2026-11-05T08:00', temperatures: [{ tempC: 195 }] };
    expect((await call(createRoute, 'POST', base, ownerToken, { projectId: pid }, raw)).status).toBe(403);
    const bad = await call(createRoute, 'POST', base, surveyorToken, { projectId: pid }, { ...raw, temperatures: [{ tempC: -5 }] });
    expect(bad.status).toBe(422);
    expect(((await bad.json()) as { error: { details: unknown } }).error.details).toEqual([{ path: 'temperatures.0.tempC', message: 'A laying temperature must be at least 0 °C.' }]);
    const made = await call(createRoute, 'POST', base, surveyorToken, { projectId: pid }, raw);
    expect(made.status).toBe(201);
    const id = ((await made.json()) as { restoration: { id: string } }).restoration.id;
    const patched = await call(patchRoute, 'PATCH', `${base}/${id}`, surveyorToken, { projectId: pid, restorationId: id }, { compactionPasses: 2 });
    expect([patched.status, ((await patched.json()) as { restoration: { check: { verdict: string } } }).restoration.check.verdict]).toEqual([200, 'warn']);
    expect((await call(patchRoute, 'PATCH', `${base}/${foreignId}`, surveyorToken, { projectId: pid, restorationId: foreignId }, { note: 'x' })).status).toBe(404);
    expect((await call(deleteRoute, 'DELETE', `${base}/${id}`, ownerToken, { projectId: pid, restorationId: id })).status).toBe(403);
    expect((await call(deleteRoute, 'DELETE', `${base}/${id}`, surveyorToken, { projectId: pid, restorationId: id })).status).toBe(200);
  });
});
