import type { Knex } from 'knex';
import { z } from 'zod';
import { writeAudit } from '@/db/audit';
import { listUtilityKinds } from '@/db/catalogues';
import type { Project } from '@/db/projects';
import {
  countPitsFromUpload, deleteTestPit, deleteUtilityCrossing, getTestPit, getUtilityCrossing, insertTestPits, insertUtilityCrossing, updateTestPit,
  updateUtilityCrossing, type TestPit, type TestPitValues, type UtilityCrossing, type UtilityCrossingValues,
} from '@/db/test-pits';
import { listUploadPointFeatures } from '@/db/upload-points';
import { getUpload } from '@/db/uploads';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import type { PointAnchor, PointAnchorInput } from '@/lib/records/anchor';
import { pitsFromUploadSchema, testPitPatchSchema, testPitSchema, utilityCrossingPatchSchema, utilityCrossingSchema } from '@/lib/records/pit-schemas';
import { clearanceStatus } from '@/lib/records/utility-clearance';
import { formatInZone } from '@/lib/records/zoned-time';
import { assertRecordWriter, placePoint } from './depth-readings';

export { CROSSING_METHODS, PIT_METHODS, pitsFromUploadSchema, testPitPatchSchema, testPitSchema, utilityCrossingPatchSchema, utilityCrossingSchema } from '@/lib/records/pit-schemas';

const invalid = (path: string, message: string) => new AppError('invalid', message, [{ path, message }]);

type Move = { routeId?: string; chainageM?: number; lon?: number; lat?: number };
const anchorInput = (v: Move): PointAnchorInput =>
  v.chainageM !== undefined ? { routeId: v.routeId!, chainageM: v.chainageM } : { lon: v.lon!, lat: v.lat!, ...(v.routeId ? { routeId: v.routeId } : {}) };

/** The record's anchor after a patch: moved when a chainage or a position is given, else where it was. */
async function movedAnchor(db: Knex, project: Project, before: { routeId: string; chainageM: number; offsetM: number; lon: number; lat: number }, patch: Move): Promise<PointAnchor> {
  if ((patch.lon === undefined) !== (patch.lat === undefined)) throw invalid(patch.lon === undefined ? 'lon' : 'lat', 'Give both longitude and latitude.');
  if (patch.chainageM === undefined && patch.lon === undefined) return { routeId: before.routeId, chainageM: before.chainageM, offsetM: before.offsetM, position: [before.lon, before.lat], source: 'position' };
  return placePoint(db, project, anchorInput({ ...patch, routeId: patch.routeId ?? (patch.chainageM !== undefined ? before.routeId : undefined) }));
}

// ---- test pits ----

const pitView = (p: TestPit) => ({ name: p.name || null, routeRef: p.routeRef, chainageM: Number(p.chainageM.toFixed(2)), dugOn: p.dugOn, method: p.method, depthM: p.depthM, findings: p.findings || null });

async function ownPit(db: Knex, project: Project, id: string): Promise<TestPit> {
  const p = await getTestPit(db, id);
  if (!p || p.projectId !== project.id) throw new AppError('not_found', 'Test pit not found.');
  return p;
}

export async function createTestPit(db: Knex, actor: Principal, project: Project, input: z.infer<typeof testPitSchema>): Promise<TestPit> {
  assertRecordWriter(actor, project);
  const anchor = await placePoint(db, project, anchorInput(input as Move));
  return db.transaction(async (trx) => {
    const [id] = await insertTestPits(trx, project.id, actor.id, [{ anchor, name: input.name ?? '', dugOn: input.dugOn ?? null, method: input.method, depthM: input.depthM ?? null, findings: input.findings ?? '' }]);
    const pit = (await getTestPit(trx, id))!;
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'test_pit', objectId: id, action: 'create', after: pitView(pit) });
    return pit;
  });
}

export async function editTestPit(db: Knex, actor: Principal, project: Project, id: string, patch: z.infer<typeof testPitPatchSchema>): Promise<TestPit> {
  assertRecordWriter(actor, project);
  return db.transaction(async (trx) => {
    const before = await ownPit(trx, project, id);
    const v: TestPitValues = {
      anchor: await movedAnchor(trx, project, before, patch),
      name: patch.name ?? before.name,
      dugOn: patch.dugOn !== undefined ? patch.dugOn : before.dugOn,
      method: patch.method ?? before.method,
      depthM: patch.depthM !== undefined ? patch.depthM : before.depthM,
      findings: patch.findings ?? before.findings,
    };
    await updateTestPit(trx, id, actor.id, v);
    const after = (await getTestPit(trx, id))!;
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'test_pit', objectId: id, action: 'update', before: pitView(before), after: pitView(after) });
    return after;
  });
}

/** Deletes a pit; the utilities found in it stay, no longer linked to a pit. */
export async function removeTestPit(db: Knex, actor: Principal, project: Project, id: string): Promise<void> {
  assertRecordWriter(actor, project);
  await db.transaction(async (trx) => {
    const before = await ownPit(trx, project, id);
    await deleteTestPit(trx, id);
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'test_pit', objectId: id, action: 'delete', before: pitView(before) });
  });
}

/**
 * Whether an upload's point is marked as a pit by `code`: its survey code or GPX type equals it, or its
 * name does or begins with it followed by a number or separator ("PIT", "PIT 3", "pit-03"), case aside.
 */
export function markedAsPit(f: { name: string | null; attributes: Record<string, unknown> }, code: string): boolean {
  const c = code.trim().toLowerCase();
  const eq = (v: unknown) => typeof v === 'string' && v.trim().toLowerCase() === c;
  if (eq(f.attributes.code) || eq(f.attributes.type)) return true;
  const name = (f.name ?? '').trim().toLowerCase();
  return name === c || (name.startsWith(c) && /^[\s_\-.#:/]*\d/.test(name.slice(c.length))) || (name.startsWith(c) && /^[\s_\-.#:/]/.test(name.slice(c.length)));
}

/**
 * Test pits from an upload's points whose code (survey CSV), type or name (GPX waypoints) marks them as
 * pits. The day dug is the point's time on the project's clock, else the upload's survey date. All in one
 * transaction; a marked point too far from every route refuses the whole import. Taken once per upload.
 */
export async function testPitsFromUpload(db: Knex, actor: Principal, project: Project, uploadId: string, input: z.infer<typeof pitsFromUploadSchema>): Promise<{ stored: number; pits: TestPit[] }> {
  assertRecordWriter(actor, project);
  const upload = await getUpload(db, uploadId);
  if (!upload || upload.projectId !== project.id) throw new AppError('not_found', 'Upload not found.');
  if (upload.status !== 'stored') throw new AppError('conflict', `The upload is ${upload.status}; pits are taken only from a stored upload.`);
  if ((await countPitsFromUpload(db, uploadId)) > 0) throw new AppError('conflict', 'Test pits were already taken from this upload; delete them first to take them again.');
  // a survey CSV groups rows sharing a code into a line when there is no line column: such a line's
  // vertices are points each, and so are vertices whose own code marks them inside a line
  const points: { seq: number; name: string | null; coord: [number, number]; time: string | null; attributes: Record<string, unknown>; vertex: number | null }[] = [];
  for (const f of await listUploadPointFeatures(db, uploadId)) {
    if (f.kind === 'point') points.push({ seq: f.seq, name: f.name, coord: f.coords[0], time: f.times?.[0] ?? null, attributes: f.attributes, vertex: null });
    else if (f.pointAttributes || f.attributes.code !== undefined) {
      f.coords.forEach((c, i) => {
        const pa = f.pointAttributes ?? {};
        const id = pa.id?.[i];
        points.push({ seq: f.seq, name: typeof id === 'string' ? id : null, coord: c, time: f.times?.[i] ?? null, attributes: { code: pa.code?.[i] ?? f.attributes.code, desc: undefined }, vertex: i + 1 });
      });
    }
  }
  const marked = points.filter((f) => markedAsPit(f, input.code));
  if (marked.length === 0) {
    const codes = [...new Set(points.flatMap((f) => [f.attributes.code, f.attributes.type]).filter((v): v is string => typeof v === 'string' && v !== ''))].slice(0, 12);
    throw invalid('code', `No point of this upload is marked ${input.code}${codes.length ? ` (its codes: ${codes.join(', ')})` : ''}.`);
  }
  const values: TestPitValues[] = [];
  const problems: { path: string; message: string }[] = [];
  for (const f of marked) {
    const where = `point ${f.seq + 1}${f.vertex ? `.${f.vertex}` : ''}${f.name ? ` (${f.name})` : ''}`;
    try {
      const anchor = await placePoint(db, project, { lon: f.coord[0], lat: f.coord[1] });
      const time = f.time;
      const notes = ['desc', 'cmt'].map((k) => f.attributes[k]).filter((v): v is string => typeof v === 'string' && v.trim() !== '');
      values.push({
        anchor, name: (f.name ?? '').slice(0, 100), dugOn: time ? formatInZone(time, project.timeZone).slice(0, 10) : upload.surveyDate,
        method: input.method, depthM: null, findings: notes.join(' — ').slice(0, 4000), uploadId, sourceSeq: f.seq,
      });
    } catch (e) {
      if (!(e instanceof AppError)) throw e;
      problems.push({ path: where, message: `${where}: ${e.message}` });
    }
  }
  if (problems.length) throw new AppError('invalid', `${problems.length} marked point${problems.length === 1 ? '' : 's'} cannot be placed; nothing was stored. ${problems.slice(0, 5).map((p) => p.message).join('; ')}`, problems);
  const ids = await db.transaction(async (trx) => {
    const out = await insertTestPits(trx, project.id, actor.id, values);
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'test_pit', objectId: uploadId, action: 'import_upload', after: { fileName: upload.fileName, code: input.code, count: out.length } });
    return out;
  });
  const pits = (await Promise.all(ids.map((id) => getTestPit(db, id)))).filter((p): p is TestPit => p !== undefined);
  return { stored: ids.length, pits };
}

// ---- utility crossings ----

const crossingView = (c: UtilityCrossing) => ({
  utility: c.utilityLabel, owner: c.owner || null, routeRef: c.routeRef, chainageM: Number(c.chainageM.toFixed(2)), depthM: c.depthM, clearanceM: c.clearanceM,
  method: c.method, foundOn: c.foundOn, pit: c.pitName ?? (c.pitId ? 'a test pit' : null), note: c.note || null,
});

async function ownCrossing(db: Knex, project: Project, id: string): Promise<UtilityCrossing> {
  const c = await getUtilityCrossing(db, id);
  if (!c || c.projectId !== project.id) throw new AppError('not_found', 'Utility crossing not found.');
  return c;
}

/** The kind must be one of the project's catalogue (a retired kind stays on old records only); the pit one of its pits. */
async function checkRefs(db: Knex, project: Project, kindId: string, pitId: string | null, keepKindId?: string): Promise<void> {
  const kind = (await listUtilityKinds(db, project.id)).find((k) => k.id === kindId);
  if (!kind) throw invalid('utilityKindId', 'Pick a kind of utility from this project\'s catalogue.');
  if (kind.retired && kind.id !== keepKindId) throw invalid('utilityKindId', `${kind.label} is retired from this project's catalogue: pick another kind.`);
  if (pitId) {
    const pit = await getTestPit(db, pitId);
    if (!pit || pit.projectId !== project.id) throw invalid('pitId', 'Pick a test pit of this project, or none.');
  }
}

export async function createUtilityCrossing(db: Knex, actor: Principal, project: Project, input: z.infer<typeof utilityCrossingSchema>): Promise<{ crossing: UtilityCrossing; warning: string | null }> {
  assertRecordWriter(actor, project);
  await checkRefs(db, project, input.utilityKindId, input.pitId ?? null);
  const anchor = await placePoint(db, project, anchorInput(input as Move));
  const v: UtilityCrossingValues = {
    anchor, pitId: input.pitId ?? null, utilityKindId: input.utilityKindId, owner: input.owner ?? '', depthM: input.depthM ?? null, clearanceM: input.clearanceM ?? null,
    method: input.method, foundOn: input.foundOn ?? null, note: input.note ?? '',
  };
  const crossing = await db.transaction(async (trx) => {
    const id = await insertUtilityCrossing(trx, project.id, actor.id, v);
    const c = (await getUtilityCrossing(trx, id))!;
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'utility_crossing', objectId: id, action: 'create', after: crossingView(c) });
    return c;
  });
  return { crossing, warning: clearanceWarning(crossing, project) };
}

/** The warning a person reads when the clearance is below the project's minimum, else null. */
export function clearanceWarning(c: { clearanceM: number | null; utilityLabel: string }, project: Project): string | null {
  const min = project.records.minClearanceM;
  return clearanceStatus(c.clearanceM, min) === 'below_minimum' ? `Clearance ${c.clearanceM!.toFixed(2)} m to the ${c.utilityLabel.toLowerCase()} is below the project's minimum of ${min.toFixed(2)} m.` : null;
}

export async function editUtilityCrossing(db: Knex, actor: Principal, project: Project, id: string, patch: z.infer<typeof utilityCrossingPatchSchema>): Promise<{ crossing: UtilityCrossing; warning: string | null }> {
  assertRecordWriter(actor, project);
  const crossing = await db.transaction(async (trx) => {
    const before = await ownCrossing(trx, project, id);
    const v: UtilityCrossingValues = {
      anchor: await movedAnchor(trx, project, before, patch),
      pitId: patch.pitId !== undefined ? patch.pitId : before.pitId,
      utilityKindId: patch.utilityKindId ?? before.utilityKindId,
      owner: patch.owner ?? before.owner,
      depthM: patch.depthM !== undefined ? patch.depthM : before.depthM,
      clearanceM: patch.clearanceM !== undefined ? patch.clearanceM : before.clearanceM,
      method: patch.method ?? before.method,
      foundOn: patch.foundOn !== undefined ? patch.foundOn : before.foundOn,
      note: patch.note ?? before.note,
    };
    await checkRefs(trx, project, v.utilityKindId, v.pitId, before.utilityKindId);
    await updateUtilityCrossing(trx, id, actor.id, v);
    const after = (await getUtilityCrossing(trx, id))!;
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'utility_crossing', objectId: id, action: 'update', before: crossingView(before), after: crossingView(after) });
    return after;
  });
  return { crossing, warning: clearanceWarning(crossing, project) };
}

export async function removeUtilityCrossing(db: Knex, actor: Principal, project: Project, id: string): Promise<void> {
  assertRecordWriter(actor, project);
  await db.transaction(async (trx) => {
    const before = await ownCrossing(trx, project, id);
    await deleteUtilityCrossing(trx, id);
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'utility_crossing', objectId: id, action: 'delete', before: crossingView(before) });
  });
}
