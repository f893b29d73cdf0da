import { randomUUID } from 'node:crypto';
import { NextRequest } from 'next/server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { listProductionFacts } from '@/db/production';
import { listBackfillMaterials } from '@/db/catalogues';
import { AppError } from '@/lib/api/errors';
import { byProjectRecord } from '@/lib/api/scopes';
import { productionCorrectionSchema, type ProductionDay } from '@/lib/records/production';
import { restorationSchema } from '@/lib/records/restoration-schema';
import { roadCrossingSchema } from '@/lib/records/road-crossing-schema';
import { correctProduction, projectProduction, withdrawProductionCorrection } from '@/lib/services/production';
import { createRestoration } from '@/lib/services/restorations';
import { createRoadCrossing } from '@/lib/services/road-crossings';
import { createToken } from '@/lib/services/tokens';
import { describeAudit } from '@/components/audit-words';
import { GET as productionRoute } from '@/app/api/projects/[projectId]/production/route';
import { POST as correctRoute } from '@/app/api/projects/[projectId]/production/corrections/route';
import { DELETE as withdrawRoute } from '@/app/api/projects/[projectId]/production/corrections/[correctionId]/route';
import { count } from '../helpers/fixtures';
import { makeRecordPlan, type RecordPlan } from '../helpers/record-plan';

const db = getDb();
let plan: RecordPlan;
let foreign: RecordPlan;
let foreignCorrectionId: string;

async function refusal(p: Promise<unknown>): Promise<AppError> {
  const err = await p.then(() => null, (e: unknown) => e);
  expect(err).toBeInstanceOf(AppError);
  return err as AppError;
}

const row = (days: ProductionDay[], day: string, crew: string) => days.find((d) => d.day === day && d.crew === crew);

/** An upload naming its crew, as the upload form stores it (the fields production reads). */
async function uploadOf(p: RecordPlan, crew: string): Promise<string> {
  const id = randomUUID();
  await db('uploads').insert({ id, project_id: p.project.id, sha256: randomUUID().replace(/-/g, '').padEnd(64, '0'), size_bytes: 1, file_name: `${crew || 'none'}.gpx`, status: 'stored', accuracy_class: 'rtk_gnss', sigma_m: 0.02, crew, content: 'trench' });
  return id;
}

/** A section as a reconciliation leaves it (the fields production reads, and what the table requires). */
async function sectionOf(p: RecordPlan, from: number, to: number, laidOn: string | null, uploads: string[], extra: Record<string, unknown> = {}): Promise<void> {
  const [a, b] = [p.at(from, 0), p.at(to, 0)];
  await db('sections').insert({
    project_id: p.project.id, planned_route_ref: 'S-1', status: 'as_planned', from_chainage_m: from, to_chainage_m: to,
    geom: db.raw('ST_SetSRID(ST_MakeLine(ST_MakePoint(?, ?), ST_MakePoint(?, ?)), 4326)', [a[0], a[1], b[0], b[1]]),
    length_m: to - from, max_offset_m: 0.1, p95_offset_m: 0.1, accuracy_m: 0.05, source_upload_ids: uploads, laid_on: laidOn, first_run: 1, last_run: 1, ...extra,
  });
}

beforeAll(async () => {
  plan = await makeRecordPlan(db, 'Production', [9.6, 52.6]);
  foreign = await makeRecordPlan(db, 'Production elsewhere', [9.7, 52.7]);
  const north = await uploadOf(plan, 'North');
  const unnamed = await uploadOf(plan, '');
  await sectionOf(plan, 0, 120, '2026-11-03', [unnamed, north]);
  await sectionOf(plan, 120, 200, '2026-11-03', [north]);
  // neither counts: a stretch a later run retired, and one not built
  await sectionOf(plan, 0, 200, '2026-11-03', [north], { retired_in_run: 2 });
  await sectionOf(plan, 0, 50, null, [north], { status: 'not_built' });
  const stone = (await listBackfillMaterials(db, plan.project.id))[0].id;
  // 00:30 on 4 November in Berlin is 23:30 UTC on the 3rd: the day is the project's
  await createRestoration(db, plan.surveyor, plan.project, restorationSchema.parse({ routeId: plan.routes.get('S-1'), fromChainageM: 0, toChainageM: 60, restoredAt: '2026-11-04T00:30', backfillMaterialId: stone, crew: 'North' }));
  await createRestoration(db, plan.surveyor, plan.project, restorationSchema.parse({ routeId: plan.routes.get('S-1'), fromChainageM: 60, toChainageM: 100, restoredAt: '2026-11-04T10:00', surfaceLaidAt: '2026-11-05T08:00', crew: 'North' }));
  await createRoadCrossing(db, plan.surveyor, plan.project, roadCrossingSchema.parse({ routeId: plan.routes.get('X-1'), built: true, builtOn: '2026-11-03', lengthM: 9.3 }));
  await createRoadCrossing(db, plan.surveyor, plan.project, roadCrossingSchema.parse({ routeId: plan.routes.get('X-2'), built: false }));
  const pit = plan.at(30, 1);
  await db('test_pits').insert({ project_id: plan.project.id, route_id: plan.routes.get('S-1'), chainage_m: 30, offset_m: 1, geom: db.raw('ST_SetSRID(ST_MakePoint(?, ?), 4326)', pit), dug_on: '2026-11-02' });
  foreignCorrectionId = (await correctProduction(db, foreign.engineer, foreign.project, productionCorrectionSchema.parse({ day: '2026-11-03', quantity: 'laid_m', value: 5, reason: 'Elsewhere' }))).id;
});
afterAll(() => closeDb());

describe('daily production', () => {
  it('derives the figures per crew and day from sections, restorations, crossings and pits, on the project\'s clock', async () => {
    const days = await projectProduction(db, plan.project);
    expect(days.map((d) => [d.day, d.crew])).toEqual([['2026-11-05', 'North'], ['2026-11-04', 'North'], ['2026-11-03', ''], ['2026-11-03', 'North'], ['2026-11-02', '']]);
    const shown = (day: string, crew: string) => Object.fromEntries(Object.entries(row(days, day, crew)!.figures).map(([q, f]) => [q, f.shown]));
    // sawn as laid (the slot is sawn the day its ducts go in [practice]); the crew named on the sections' uploads
    expect(shown('2026-11-03', 'North')).toEqual({ sawn_m: 200, laid_m: 200, backfilled_m: null, restored_m: null, crossings: null, pits: null });
    expect(shown('2026-11-03', '')).toEqual({ sawn_m: 9.3, laid_m: null, backfilled_m: null, restored_m: null, crossings: 1, pits: null });
    expect(shown('2026-11-04', 'North')).toEqual({ sawn_m: null, laid_m: null, backfilled_m: 60, restored_m: 60, crossings: null, pits: null });
    // restored the day its surface was laid
    expect(shown('2026-11-05', 'North')).toMatchObject({ restored_m: 40, backfilled_m: null });
    expect(shown('2026-11-02', '')).toMatchObject({ pits: 1 });
    expect((await projectProduction(db, plan.project, { from: '2026-11-04', to: '2026-11-04' })).map((d) => d.day)).toEqual(['2026-11-04']);
  });

  it('derives what it can when the crossings\' and pits\' tables are not there (their migrations are other parts\')', async () => {
    let facts: Awaited<ReturnType<typeof listProductionFacts>> = [];
    const undo = new Error('undo the renames');
    await db.transaction(async (trx) => {
      await trx.raw('ALTER TABLE road_crossings RENAME TO road_crossings_away');
      await trx.raw('ALTER TABLE test_pits RENAME TO test_pits_away');
      facts = await listProductionFacts(trx, plan.project.id, plan.project.timeZone);
      throw undo;
    }).catch((e: unknown) => {
      if (e !== undo) throw e;
    });
    expect(facts.some((f) => f.quantity === 'crossings' || f.quantity === 'pits')).toBe(false);
    expect(facts.filter((f) => f.quantity === 'laid_m').reduce((s, f) => s + f.value, 0)).toBe(200);
    // and the tables are back
    expect(await count(db, 'test_pits')).toBeGreaterThan(0);
  });

  it('shows a correction in place of the derived figure, with the derived one and the reason, and audits it', async () => {
    const audits = await count(db, 'audit_log');
    const c = await correctProduction(db, plan.engineer, plan.project, productionCorrectionSchema.parse({ day: '2026-11-03', crew: 'North', quantity: 'sawn_m', value: 330, reason: 'Cobbler Walk sawn ahead of laying (site diary).' }));
    expect(c).toMatchObject({ day: '2026-11-03', crew: 'North', quantity: 'sawn_m', value: 330, reason: 'Cobbler Walk sawn ahead of laying (site diary).' });
    const fig = row(await projectProduction(db, plan.project), '2026-11-03', 'North')!.figures.sawn_m;
    expect([fig.derived, fig.shown, fig.correction?.reason, fig.correction?.createdByName]).toEqual([200, 330, 'Cobbler Walk sawn ahead of laying (site diary).', plan.engineer.name]);
    expect(await count(db, 'audit_log')).toBe(audits + 1);
    const entry = await db('audit_log').where({ object_type: 'production_correction', object_id: c.id }).first();
    expect(entry.after).toMatchObject({ derived: 200, value: 330 });
    expect(describeAudit({ objectType: 'production_correction', action: 'create', before: entry.before, after: entry.after })).toBe('Corrected the metres sawn of North on 2026-11-03 from 200 to 330. Reason: Cobbler Walk sawn ahead of laying (site diary).');

    // the newest counts; withdrawing it brings back the one before, then the derived figure
    const newer = await correctProduction(db, plan.surveyor, plan.project, productionCorrectionSchema.parse({ day: '2026-11-03', crew: 'North', quantity: 'sawn_m', value: 320, reason: 'Measured again' }));
    expect(row(await projectProduction(db, plan.project), '2026-11-03', 'North')!.figures.sawn_m.shown).toBe(320);
    await withdrawProductionCorrection(db, plan.surveyor, plan.project, newer.id);
    expect(row(await projectProduction(db, plan.project), '2026-11-03', 'North')!.figures.sawn_m.shown).toBe(330);
    const withdrawn = await db('audit_log').where({ object_type: 'production_correction', object_id: newer.id, action: 'delete' }).first();
    expect(describeAudit({ objectType: 'production_correction', action: 'delete', before: withdrawn.before, after: withdrawn.after })).toBe('Withdrew the correction of the metres sawn of North on 2026-11-03 to 320.');
  });

  it('corrects a day and crew no record names: a row of its own', async () => {
    await correctProduction(db, plan.surveyor, plan.project, productionCorrectionSchema.parse({ day: '2026-11-01', crew: 'South', quantity: 'pits', value: 2, reason: 'Pits not entered' }));
    const south = row(await projectProduction(db, plan.project), '2026-11-01', 'South')!;
    expect([south.figures.pits.derived, south.figures.pits.shown]).toEqual([null, 2]);
  });

  it('refuses each bad field with its message, storing nothing', async () => {
    const first = (b: unknown) => {
      const r = productionCorrectionSchema.safeParse(b);
      expect(r.success).toBe(false);
      // the first message of each field: the one a form shows
      const out: Record<string, string> = {};
      for (const i of r.error!.issues) out[i.path.join('.')] ??= i.message;
      return out;
    };
    const ok = { day: '2026-11-03', crew: 'North', quantity: 'laid_m', value: 10, reason: 'Diary' };
    expect(first({ ...ok, reason: '' })).toEqual({ reason: 'Say why the figure is corrected.' });
    expect(first({ ...ok, value: 'ten' })).toEqual({ value: 'The corrected figure must be a number.' });
    expect(first({ ...ok, value: 200_000 })).toEqual({ value: 'The corrected figure must be at most 100000.' });
    expect(first({ ...ok, quantity: 'crossings', value: 0.5 })).toEqual({ value: 'Crossings and pits are counted: give a whole number.' });
    expect(first({ ...ok, day: 'yesterday' })).toEqual({ day: 'Give the day as YYYY-MM-DD.' });
    expect(first({ ...ok, crew: 'x'.repeat(201) })).toEqual({ crew: 'Keep the crew under 200 characters.' });
    const before = [await count(db, 'production_corrections'), await count(db, 'audit_log')];
    expect((await refusal(correctProduction(db, plan.owner, plan.project, productionCorrectionSchema.parse(ok)))).status).toBe(403);
    expect([await count(db, 'production_corrections'), await count(db, 'audit_log')]).toEqual(before);
  });

  it('lets the contractor\'s surveyors and engineers correct; the owner\'s people and maintenance read only', async () => {
    const ok = productionCorrectionSchema.parse({ day: '2026-11-03', quantity: 'laid_m', value: 10, reason: 'Diary' });
    for (const who of [plan.owner, plan.maintenance]) expect((await refusal(correctProduction(db, who, plan.project, ok))).status).toBe(403);
    const mine = (await db('production_corrections').where({ project_id: plan.project.id }).first('id')).id;
    expect((await refusal(withdrawProductionCorrection(db, plan.owner, plan.project, mine))).status).toBe(403);
  });

  it('keeps projects apart: another project\'s correction is not found, and not counted', async () => {
    expect((await refusal(withdrawProductionCorrection(db, plan.surveyor, plan.project, foreignCorrectionId))).code).toBe('not_found');
    const scope = byProjectRecord('production_corrections', 'correctionId');
    expect(await scope({ projectId: plan.project.id, correctionId: foreignCorrectionId }, db)).toBeUndefined();
    expect(await scope({ projectId: foreign.project.id, correctionId: foreignCorrectionId }, db)).toEqual({ projectId: foreign.project.id });
    const days = await projectProduction(db, plan.project);
    expect(days.flatMap((d) => Object.values(d.figures)).some((f) => f.correction?.id === foreignCorrectionId)).toBe(false);
    expect((await projectProduction(db, foreign.project)).map((d) => [d.day, d.figures.laid_m.shown])).toEqual([['2026-11-03', 5]]);
  });

  it('answers through the API: the list for every reader, 201 for the contractor, 403 for the owner, 404 for another project\'s correction, 422 with details', async () => {
    const surveyorToken = (await createToken(db, plan.surveyor, { name: 'production' })).secret;
    const ownerToken = (await createToken(db, plan.owner, { name: 'production' })).secret;
    const call = (handler: (req: NextRequest, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>, method: string, url: string, token: string, params: Record<string, string>, b?: unknown) =>
      handler(new NextRequest(`http://127.0.0.1${url}`, { method, headers: { authorization: `Bearer ${token}`, 'content-type': 'application/json' }, body: b === undefined ? undefined : JSON.stringify(b) }), { params: Promise.resolve(params) });
    const pid = plan.project.id;
    const base = `/api/projects/${pid}/production`;
    const list = await call(productionRoute, 'GET', `${base}?from=2026-11-03&to=2026-11-04`, ownerToken, { projectId: pid });
    expect(list.status).toBe(200);
    const json = (await list.json()) as { timeZone: string; days: ProductionDay[] };
    expect([json.timeZone, json.days.map((d) => `${d.day} ${d.crew}`)]).toEqual(['Europe/Berlin', ['2026-11-04 North', '2026-11-03 ', '2026-11-03 North']]);
    const badRange = await call(productionRoute, 'GET', `${base}?from=2026-11-05&to=2026-11-01`, ownerToken, { projectId: pid });
    expect(badRange.status).toBe(422);
    const body = { day: '2026-11-04', crew: 'North', quantity: 'restored_m', value: 65, reason: 'Edge strip included' };
    expect((await call(correctRoute, 'POST', `${base}/corrections`, ownerToken, { projectId: pid }, body)).status).toBe(403);
    const bad = await call(correctRoute, 'POST', `${base}/corrections`, surveyorToken, { projectId: pid }, { ...body, reason: ' ' });
    expect(bad.status).toBe(422);
    expect(((await bad.json()) as { error: { details: unknown } }).error.details).toEqual([{ path: 'reason', message: 'Say why the figure is corrected.' }]);
    const made = await call(correctRoute, 'POST', `${base}/corrections`, surveyorToken, { projectId: pid }, body);
    expect(made.status).toBe(201);
    const id = ((await made.json()) as { correction: { id: string } }).correction.id;
    expect((await call(withdrawRoute, 'DELETE', `${base}/corrections/${foreignCorrectionId}`, surveyorToken, { projectId: pid, correctionId: foreignCorrectionId })).status).toBe(404);
    expect((await call(withdrawRoute, 'DELETE', `${base}/corrections/${id}`, ownerToken, { projectId: pid, correctionId: id })).status).toBe(403);
    expect((await call(withdrawRoute, 'DELETE', `${base}/corrections/${id}`, surveyorToken, { projectId: pid, correctionId: id })).status).toBe(200);
  });
});
