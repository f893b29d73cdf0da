import type { Knex } from 'knex';
import { writeAudit } from '@/db/audit';
import type { Project } from '@/db/projects';
import {
  deleteRestoration, getRestoration, insertRestoration, replaceTemperatures, updateRestoration,
  type Restoration, type RestorationValues,
} from '@/db/restorations';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import type { RestorationInput, RestorationPatch, TemperatureReadingInput } from '@/lib/records/restoration-schema';
import { formatInZone, wallTimeToUtc } from '@/lib/records/zoned-time';
import { resolveStretchAnchor } from './record-anchors';
import { assertContractorWriter } from './road-crossings';

/** What the audit log keeps of a restoration: its figures and its verdict, times on the project's clock. */
function audited(r: Restoration, timeZone: string) {
  const wall = (t: string | null) => (t ? formatInZone(t, timeZone).slice(0, 16) : null);
  return {
    route: r.routeRef, fromChainageM: r.fromChainageM, toChainageM: r.toChainageM, restoredAt: wall(r.restoredAt), backfillMaterial: r.backfillMaterial,
    compactionPasses: r.compactionPasses, requiredThicknessMm: r.requiredThicknessMm, laidThicknessMm: r.laidThicknessMm,
    edgesCleanedAt: wall(r.edgesCleanedAt), surfaceLaidAt: wall(r.surfaceLaidAt), crew: r.crew, note: r.note,
    temperaturesC: r.temperatures.map((t) => t.tempC), verdict: r.check.verdict,
  };
}

/** A wall-clock time on the project's clock as an instant; refused (with the field) when no such time exists. */
function instant(wall: string | null | undefined, project: Project, path: string): string | null {
  if (!wall) return null;
  const t = wallTimeToUtc(wall, project.timeZone);
  if (!t) throw new AppError('invalid', `${wall} is not a real date and time.`, [{ path, message: 'Give a real date and time (YYYY-MM-DDTHH:mm).' }]);
  return t;
}

function readings(list: TemperatureReadingInput[], project: Project): { measuredAt: string | null; tempC: number }[] {
  return list.map((t, i) => ({ measuredAt: instant(t.measuredAt, project, `temperatures.${i}.measuredAt`), tempC: t.tempC }));
}

async function checkBackfill(db: Knex | Knex.Transaction, projectId: string, id: string | null): Promise<void> {
  if (!id) return;
  const row = await db('backfill_materials').where({ id, project_id: projectId }).first('id');
  if (!row) throw new AppError('invalid', 'That backfill material is not in this project\'s catalogue.', [{ path: 'backfillMaterialId', message: 'Pick a backfill material of this project\'s catalogue.' }]);
}

function checkOrder(v: RestorationValues): void {
  if (v.edgesCleanedAt && v.surfaceLaidAt && Date.parse(v.surfaceLaidAt) < Date.parse(v.edgesCleanedAt)) {
    throw new AppError('invalid', 'The surface is laid after the edges are cleaned.', [{ path: 'surfaceLaidAt', message: 'The surface is laid after the edges are cleaned: check the two times.' }]);
  }
}

/**
 * Records the restoration of a stretch with its laying temperatures. Compaction passes and the required
 * thickness default to the project's settings. Refuses a route of another project or removed from the
 * plan, a stretch beyond the route's end and a backfill material from outside the project's catalogue.
 */
export async function createRestoration(db: Knex, actor: Principal, project: Project, input: RestorationInput): Promise<Restoration> {
  assertContractorWriter(actor, project);
  const route = await resolveStretchAnchor(db, project.id, { routeId: input.routeId, fromChainageM: input.fromChainageM, toChainageM: input.toChainageM });
  const v: RestorationValues = {
    fromChainageM: input.fromChainageM,
    toChainageM: input.toChainageM,
    restoredAt: instant(input.restoredAt, project, 'restoredAt')!,
    backfillMaterialId: input.backfillMaterialId ?? null,
    compactionPasses: input.compactionPasses ?? project.records.compactionPassesDefault,
    requiredThicknessMm: input.requiredThicknessMm ?? project.records.surfaceThicknessMm,
    laidThicknessMm: input.laidThicknessMm ?? null,
    edgesCleanedAt: instant(input.edgesCleanedAt, project, 'edgesCleanedAt'),
    surfaceLaidAt: instant(input.surfaceLaidAt, project, 'surfaceLaidAt'),
    crew: input.crew ?? '',
    note: input.note ?? '',
  };
  checkOrder(v);
  const temps = readings(input.temperatures ?? [], project);
  await checkBackfill(db, project.id, v.backfillMaterialId);
  const id = await db.transaction(async (trx) => {
    const newId = await insertRestoration(trx, project.id, route.id, v, actor.id);
    await replaceTemperatures(trx, newId, temps);
    const created = (await getRestoration(trx, newId))!;
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'restoration', objectId: newId, action: 'create', after: audited(created, project.timeZone) });
    return newId;
  });
  return (await getRestoration(db, id))!;
}

/** Changes a restoration (the route stays); `temperatures`, when sent, replace the readings. */
export async function editRestoration(db: Knex, actor: Principal, project: Project, id: string, patch: RestorationPatch): Promise<Restoration> {
  assertContractorWriter(actor, project);
  await db.transaction(async (trx) => {
    await trx('restorations').where({ id }).forUpdate().first('id');
    const before = await getRestoration(trx, id);
    if (!before || before.projectId !== project.id) throw new AppError('not_found', 'No such restoration in this project.');
    const pick = <T>(value: T | undefined, current: T): T => (value === undefined ? current : value);
    const v: RestorationValues = {
      fromChainageM: pick(patch.fromChainageM, before.fromChainageM),
      toChainageM: pick(patch.toChainageM, before.toChainageM),
      restoredAt: patch.restoredAt === undefined ? before.restoredAt : instant(patch.restoredAt, project, 'restoredAt')!,
      backfillMaterialId: pick(patch.backfillMaterialId, before.backfillMaterialId),
      compactionPasses: pick(patch.compactionPasses, before.compactionPasses),
      requiredThicknessMm: pick(patch.requiredThicknessMm, before.requiredThicknessMm),
      laidThicknessMm: pick(patch.laidThicknessMm, before.laidThicknessMm),
      edgesCleanedAt: patch.edgesCleanedAt === undefined ? before.edgesCleanedAt : instant(patch.edgesCleanedAt, project, 'edgesCleanedAt'),
      surfaceLaidAt: patch.surfaceLaidAt === undefined ? before.surfaceLaidAt : instant(patch.surfaceLaidAt, project, 'surfaceLaidAt'),
      crew: pick(patch.crew, before.crew),
      note: pick(patch.note, before.note),
    };
    if (v.toChainageM <= v.fromChainageM) throw new AppError('invalid', 'The stretch must end after it starts.', [{ path: 'toChainageM', message: 'The stretch must end after it starts (to chainage above from chainage).' }]);
    // a route removed from the plan keeps its records, and they stay editable
    await resolveStretchAnchor(trx, project.id, { routeId: before.routeId, fromChainageM: v.fromChainageM, toChainageM: v.toChainageM }, true);
    checkOrder(v);
    await checkBackfill(trx, project.id, v.backfillMaterialId);
    await updateRestoration(trx, id, v, actor.id);
    if (patch.temperatures !== undefined) await replaceTemperatures(trx, id, readings(patch.temperatures, project));
    const after = (await getRestoration(trx, id))!;
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'restoration', objectId: id, action: 'update', before: audited(before, project.timeZone), after: audited(after, project.timeZone) });
  });
  return (await getRestoration(db, id))!;
}

/** Removes a restoration and its readings. */
export async function removeRestoration(db: Knex, actor: Principal, project: Project, id: string): Promise<void> {
  assertContractorWriter(actor, project);
  await db.transaction(async (trx) => {
    const before = await getRestoration(trx, id);
    if (!before || before.projectId !== project.id) throw new AppError('not_found', 'No such restoration in this project.');
    await deleteRestoration(trx, id);
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'restoration', objectId: id, action: 'delete', before: audited(before, project.timeZone) });
  });
}
