import geodesic from 'geographiclib-geodesic';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { listCorrections } from '@/db/corrections';
import { listPlanVersions } from '@/db/planned';
import { getProject, type Project } from '@/db/projects';
import { getSection, listCurrentSections, type Section } from '@/db/sections';
import { AppError } from '@/lib/api/errors';
import type { Principal } from '@/lib/auth/principal';
import { correctionSchema, correctSection, withdrawSectionCorrection } from '@/lib/services/corrections';
import { importPlan } from '@/lib/services/planned';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { runReconciliation, sectionDetail } from '@/lib/services/reconcile';
import { receiveUpload } from '@/lib/services/uploads';
import { mulberry32 } from '@/lib/records/seeded-random';
import { count, makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf } from '../helpers/upload-form';

// Engineers' corrections through the real pipeline: stored, audited, applied again by every run.
// Positions are drawn with GeographicLib's direct problem; RTK points (2 cm noise) make the sections crisp.
process.env.STORAGE_DIR = path.resolve(__dirname, '../../.data/test-storage-corrections');
const G = geodesic.Geodesic.WGS84;
const db = getDb();
let engineer: Principal;
let project: Project;
let rtkEastId: string;

const CORNER: [number, number] = [9.131, 52.117];
const at = (azi: number, s: number, left = 0, from = CORNER): [number, number] => {
  const p = G.Direct(from[1], from[0], azi, s);
  if (!left) return [p.lon2!, p.lat2!];
  const q = G.Direct(p.lat2!, p.lon2!, p.azi2! - 90, left);
  return [q.lon2!, q.lat2!];
};
const SOUTH = at(180, 12);
const design = JSON.stringify({
  type: 'FeatureCollection',
  features: [
    { type: 'Feature', properties: { route_id: 'E-1', street: 'Lantern Row', type: 'street' }, geometry: { type: 'LineString', coordinates: [at(90, 0), at(90, 150)] } },
    { type: 'Feature', properties: { route_id: 'N-1', street: 'Saddler Lane', type: 'street' }, geometry: { type: 'LineString', coordinates: [at(0, 0), at(0, 120)] } },
    // a parallel route 12 m south of E-1, not joined to it
    { type: 'Feature', properties: { route_id: 'P-1', street: 'Lantern Row (south side)', type: 'street' }, geometry: { type: 'LineString', coordinates: [at(90, 0, 0, SOUTH), at(90, 150, 0, SOUTH)] } },
  ],
});

function rtk(points: [number, number][]): string {
  const u = mulberry32(7);
  const n = () => Math.sqrt(-2 * Math.log(u() + 1e-12)) * Math.cos(2 * Math.PI * u());
  return ['id,lat,lon', ...points.map(([lon, lat], i) => `${i + 1},${(lat + (0.02 * n()) / 111_200).toFixed(9)},${(lon + (0.02 * n()) / 68_400).toFixed(9)}`)].join('\n') + '\n';
}
const range = (a: number, b: number, step: number) => Array.from({ length: Math.floor((b - a) / step) + 1 }, (_, i) => a + i * step);

async function upload(name: string, text: string, fields: Record<string, string>) {
  const form = await formOf([{ name, bytes: text }], fields);
  try {
    return (await receiveUpload(db, engineer, project, form)).upload;
  } finally {
    await form.cleanup();
  }
}
const run = () => runReconciliation(db, project.id, null, { userId: engineer.id, label: 'test', organisationId: engineer.organisationId }, async () => {});
const current = () => listCurrentSections(db, project.id);
const on = async (ref: string) => (await current()).filter((s) => s.plannedRouteRef === ref);
const built = (ss: Section[]) => ss.filter((s) => s.status !== 'not_built').reduce((n, s) => n + s.toChainageM - s.fromChainageM, 0);
const correct = (s: Section, input: unknown) => correctSection(db, engineer, s.id, correctionSchema.parse(input));

/** A refused correction: its code and message, and not one correction row or audit entry more. */
async function refused(s: Section, input: unknown, code: string, message: RegExp) {
  const [rows, audit] = [await count(db, 'section_corrections'), await count(db, 'audit_log')];
  const err = await correct(s, input).catch((e) => e);
  expect(err).toBeInstanceOf(AppError);
  expect(err.code).toBe(code);
  expect(err.message).toMatch(message);
  expect(await count(db, 'section_corrections')).toBe(rows);
  expect(await count(db, 'audit_log')).toBe(audit);
}

beforeAll(async () => {
  const admin = await makePrincipal(db, 'admin', 'contractor');
  engineer = await makePrincipal(db, 'engineer', 'contractor', admin.organisationName);
  project = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: 'Corrections', partnerOrganisation: await registerPartner(db, admin, `C owner ${Date.now()}`), lateralToleranceM: 0.5 }))).id))!;
  const form = await formOf([{ name: 'design.geojson', bytes: design }]);
  await importPlan(db, engineer, project, form);
  await form.cleanup();
  // E-1 surveyed from 0 to 100 m; N-1 0–120 m with 0.9 m to the west between 40 and 80 m, then on past its end
  rtkEastId = (await upload('east.csv', rtk(range(0, 100, 2).map((s) => at(90, s))), { accuracy: 'rtk_gnss', surveyDate: '2026-10-20' })).id;
  await upload('north.csv', rtk([...range(0, 120, 2).map((s) => at(0, s, s >= 40 && s <= 80 ? 0.9 : 0)), ...range(122, 190, 2).map((s) => at(0, s))]), { accuracy: 'rtk_gnss', surveyDate: '2026-10-21' });
  await run();
});
afterAll(() => closeDb());

describe('corrections of sections', () => {
  it('starts from what the pipeline derived', async () => {
    const east = await on('E-1');
    expect(east.map((s) => s.status)).toEqual(['as_planned', 'not_built']);
    expect(east[0].toChainageM).toBeGreaterThan(98);
    const north = await on('N-1');
    expect(north.map((s) => s.status)).toEqual(['as_planned', 'deviates', 'as_planned']);
    expect((await current()).some((s) => s.status === 'unplanned' && s.lengthM > 50)).toBe(true);
  });

  it('splits a section at a chainage: one piece keeps the id, the other links to it, and a re-run keeps both', async () => {
    const [whole] = await on('E-1');
    const { correction, job } = await correct(whole, { kind: 'split', atChainageM: 50, reason: 'two crews, two days' });
    expect(correction.kind).toBe('split');
    expect(job.kind).toBe('reconcile');
    await run();
    const pieces = (await on('E-1')).filter((s) => s.status === 'as_planned');
    expect(pieces.map((s) => [Math.round(s.fromChainageM), Math.round(s.toChainageM)])).toEqual([[0, 50], [50, Math.round(whole.toChainageM)]]);
    expect(pieces.map((s) => s.id)).toContain(whole.id);
    const other = pieces.find((s) => s.id !== whole.id)!;
    expect(other.derivedFrom).toBe(whole.id);
    expect(pieces.every((s) => s.correctionIds.includes(correction.id))).toBe(true);
    const ids = (await current()).map((s) => s.id).sort();
    const again = await run();
    expect(again.created).toBe(0);
    expect((await current()).map((s) => s.id).sort()).toEqual(ids);
    expect(await db('audit_log').where({ project_id: project.id, object_id: whole.id, action: 'correct_split' })).toHaveLength(1);
  });

  it('merges neighbours back: the merge withdraws the split at that chainage', async () => {
    const [a, b] = (await on('E-1')).filter((s) => s.status === 'as_planned');
    await correct(a, { kind: 'merge', withSectionId: b.id, reason: 'one section after all' });
    await run();
    expect((await on('E-1')).filter((s) => s.status === 'as_planned')).toHaveLength(1);
    const split = (await listCorrections(db, project.id)).find((c) => c.kind === 'split')!;
    expect(split.withdrawnAt).not.toBeNull();
  });

  it('merges an as-planned stretch with a deviating neighbour into one deviating section', async () => {
    const [first, dev] = await on('N-1');
    await correct(first, { kind: 'merge', withSectionId: dev.id, reason: 'one reinstatement, one record' });
    await run();
    const north = await on('N-1');
    expect(north.map((s) => s.status)).toEqual(['deviates', 'as_planned']);
    expect(north[0].fromChainageM).toBe(0);
    expect(Math.abs(north[0].toChainageM - dev.toChainageM)).toBeLessThan(0.5);
    expect(north[0].maxOffsetM).toBeCloseTo(dev.maxOffsetM!, 6);
  });

  it('records why a stretch is not built, and counts part of it built on another source', async () => {
    const gap = (await on('E-1')).find((s) => s.status === 'not_built')!;
    await correct(gap, { kind: 'not_built_reason', reason: 'private forecourt: the owner refused access' });
    await run();
    expect((await on('E-1')).find((s) => s.status === 'not_built')!.note).toBe('private forecourt: the owner refused access');
    const stillGap = (await on('E-1')).find((s) => s.status === 'not_built')!;
    await correct(stillGap, { kind: 'mark_built', fromChainageM: 100, toChainageM: 130, sourceUploadId: rtkEastId, reason: 'surveyed on the day sheet; the RTK file of that afternoon was lost' });
    await run();
    const east = await on('E-1');
    const counted = east.find((s) => s.note?.startsWith('Counted built'))!;
    expect(counted.status).toBe('as_planned');
    expect([Math.round(counted.fromChainageM), Math.round(counted.toChainageM)]).toEqual([100, 130]);
    expect(counted.sourceUploadIds).toEqual([rtkEastId]);
    // R95 = 2.4477 σ for a circular normal error [computed: sqrt(−2 ln 0.05)], σ 0.02 m of the RTK class
    expect(counted.accuracyM).toBeCloseTo(2.4477 * 0.02, 6);
    // nothing measured its offsets: empty, not 0
    expect([counted.maxOffsetM, counted.p95OffsetM]).toEqual([null, null]);
    expect(counted.laidOn).toBe('2026-10-20');
    const rest = east.find((s) => s.status === 'not_built')!;
    expect(Math.round(rest.fromChainageM)).toBe(130);
    expect(rest.note).toBe('private forecourt: the owner refused access');
  });

  it('reassigns a stretch to another route, and withdrawing the correction puts it back', async () => {
    const builtBefore = built(await on('E-1'));
    const s = (await on('E-1')).find((x) => x.status === 'as_planned' && x.fromChainageM < 1)!;
    const { correction } = await correct(s, { kind: 'reassign', toRouteRef: 'P-1', fromChainageM: 0, toChainageM: 40, reason: 'the crew logged the south side under the north reference' });
    await run();
    expect(built(await on('E-1'))).toBeCloseTo(builtBefore - 40, -0.5);
    // 12 m from P-1: built there, and far beyond the 0.5 m tolerance
    const south = (await on('P-1')).filter((x) => x.status !== 'not_built');
    expect(south).toHaveLength(1);
    expect(south[0].status).toBe('deviates');
    expect(south[0].maxOffsetM).toBeGreaterThan(11.5);
    await withdrawSectionCorrection(db, engineer, project.id, correction.id);
    await run();
    expect(built(await on('E-1'))).toBeCloseTo(builtBefore, 0);
    expect(built(await on('P-1'))).toBe(0);
    const err = await withdrawSectionCorrection(db, engineer, project.id, correction.id).catch((e) => e);
    expect(err.code).toBe('conflict');
  });

  it('promotes an unplanned stretch to a planned route in a new plan version', async () => {
    const versions = (await listPlanVersions(db, project.id)).length;
    const extra = (await current()).find((s) => s.status === 'unplanned' && s.lengthM > 50)!;
    const { correction } = await correct(extra, { kind: 'promote', ref: 'N-2', street: 'Saddler Lane (extension)', reason: 'laid on to the new estate by agreement' });
    const plan = await listPlanVersions(db, project.id);
    expect(plan).toHaveLength(versions + 1);
    expect(plan[0].format).toBe('promotion');
    expect(plan[0].changes.added).toEqual(['N-2']);
    await run();
    expect((await getSection(db, extra.id))!.retiredInRun).not.toBeNull();
    const promoted = await on('N-2');
    expect(built(promoted) / promoted.reduce((n, s) => n + s.toChainageM - s.fromChainageM, 0)).toBeGreaterThan(0.95);
    expect(await db('audit_log').where({ project_id: project.id, action: 'promote_route' })).toHaveLength(1);
    const err = await withdrawSectionCorrection(db, engineer, project.id, correction.id).catch((e) => e);
    expect(err.code).toBe('conflict');
    expect(err.message).toMatch(/part of the plan now/);
  });

  it('keeps corrections in force across an overlapping upload and a plan revision', async () => {
    const [a] = (await on('E-1')).filter((s) => s.status === 'as_planned');
    await correct(a, { kind: 'split', atChainageM: 30, reason: 'a driveway apron between the two halves' });
    await run();
    const boundaries = async () => (await on('E-1')).filter((s) => s.status === 'as_planned').map((s) => Math.round(s.fromChainageM));
    expect(await boundaries()).toContain(30);
    // a second RTK survey of the same stretch, then the design re-issued with a street renamed
    await upload('east-again.csv', rtk(range(1, 99, 2).map((s) => at(90, s))), { accuracy: 'rtk_gnss', surveyDate: '2026-10-25' });
    await run();
    expect(await boundaries()).toContain(30);
    const form = await formOf([{ name: 'design-rev.geojson', bytes: design.replace('"Lantern Row"', '"Lantern Row (upper)"') }]);
    await importPlan(db, engineer, project, form);
    await form.cleanup();
    await run();
    expect(await boundaries()).toContain(30);
    expect((await on('E-1')).find((s) => s.status === 'not_built')!.note).toBe('private forecourt: the owner refused access');
  });

  it('refuses corrections that do not fit the section, with a specific message and nothing stored', async () => {
    const east = await on('E-1');
    const asBuilt = east.find((s) => s.status === 'as_planned')!;
    const gap = east.find((s) => s.status === 'not_built')!;
    await refused(asBuilt, { kind: 'split', atChainageM: asBuilt.toChainageM + 5, reason: 'outside' }, 'invalid', /Split inside the section/);
    await refused(asBuilt, { kind: 'merge', withSectionId: (await on('N-1'))[0].id, reason: 'far away' }, 'invalid', /just before or just after/);
    const counted = east.find((s) => s.note?.startsWith('Counted built'))!;
    await refused(counted, { kind: 'merge', withSectionId: gap.id, reason: 'with the gap' }, 'invalid', /Only built sections merge/);
    await refused(asBuilt, { kind: 'reassign', toRouteRef: 'Q-9', reason: 'no such route' }, 'invalid', /no route 'Q-9'/);
    await refused(asBuilt, { kind: 'reassign', toRouteRef: 'E-1', reason: 'same route' }, 'invalid', /already on E-1/);
    await refused(asBuilt, { kind: 'mark_built', reason: 'it was observed' }, 'invalid', /Only a not-built stretch/);
    await refused(asBuilt, { kind: 'not_built_reason', reason: 'but it is built' }, 'invalid', /goes on a not-built section/);
    await refused(asBuilt, { kind: 'promote', ref: 'X', reason: 'planned already' }, 'invalid', /Only an unplanned section/);
    await refused(gap, { kind: 'mark_built', fromChainageM: 0, toChainageM: 300, reason: 'too far' }, 'invalid', /within the section/);
    const detail = await sectionDetail(db, asBuilt.id);
    expect(detail.route?.ref).toBe('E-1');
    expect(detail.observations.length).toBeGreaterThan(0);
    expect(detail.sources.map((x) => x.id)).toContain(rtkEastId);
    expect(correctionSchema.safeParse({ kind: 'split', atChainageM: -1, reason: 'negative' }).success).toBe(false);
    expect(correctionSchema.safeParse({ kind: 'split', atChainageM: 10, reason: '' }).success).toBe(false);
  });
});
