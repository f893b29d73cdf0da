import type { Knex } from 'knex';
import { z } from 'zod';
import { writeAudit } from '@/db/audit';
import { getCorrection, insertCorrection, listCorrections, withdrawCorrection, type NewCorrection, type StoredCorrection } from '@/db/corrections';
import { listPlannedRoutes } from '@/db/planned';
import { getSection, neighbourSections, type Section } from '@/db/sections';
import { getUpload } from '@/db/uploads';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { ACCURACY_CLASSES, DEFAULT_SIGMA_M } from '@/lib/records/accuracy-classes';
import { plausibleDate, RANGES, rangedNumber } from '@/lib/records/plausible-ranges';
import { addPromotedRoute } from './planned';
import { requestReconciliation } from './reconcile';

const reason = z.string().trim().min(3, 'Say why: the reason goes into the audit log.').max(1000);
const chainage = rangedNumber(RANGES.chainageM);

/** One correction of a section, by kind; every kind carries the engineer's reason. */
export const correctionSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('split'), atChainageM: chainage, reason }),
  z.object({ kind: z.literal('merge'), withSectionId: z.uuid('Choose the neighbouring section to merge with.'), reason }),
  z.object({ kind: z.literal('reassign'), toRouteRef: z.string().trim().min(1, 'Choose the route the stretch belongs to.'), fromChainageM: chainage.optional(), toChainageM: chainage.optional(), reason }),
  z.object({
    kind: z.literal('mark_built'),
    sourceUploadId: z.uuid('Choose an upload of this project, or leave it empty.').optional(),
    accuracyClass: z.enum(ACCURACY_CLASSES).optional(),
    laidOn: plausibleDate('the date laid').optional(),
    fromChainageM: chainage.optional(),
    toChainageM: chainage.optional(),
    reason,
  }),
  z.object({
    kind: z.literal('promote'),
    ref: z.string().trim().min(1, 'Give the new route a reference.').max(60).regex(/^[\w .\-/]+$/, 'Use letters, digits, spaces and . - / _ in a route reference.'),
    street: z.string().trim().max(200).optional(),
    routeKind: z.enum(['street', 'crossing']).default('street'),
    reason,
  }),
  z.object({ kind: z.literal('not_built_reason'), reason }),
]);
export type CorrectionInput = z.infer<typeof correctionSchema>;

const invalid = (path: string, message: string) => new AppError('invalid', message, [{ path, message }]);
const fmt = (m: number) => `${m.toFixed(1)} m`;

/** The stretch a range correction covers: the section's own range unless narrowed, and never beyond it. */
function rangeIn(s: Section, from: number | undefined, to: number | undefined): [number, number] {
  const a = from ?? s.fromChainageM;
  const b = to ?? s.toChainageM;
  if (a < s.fromChainageM - 0.5 || b > s.toChainageM + 0.5) throw invalid('fromChainageM', `The range must lie within the section, ${fmt(s.fromChainageM)} to ${fmt(s.toChainageM)}.`);
  if (b - a < 1) throw invalid('toChainageM', 'The range must end at least 1 m after it starts.');
  return [a, b];
}

function needsRoute(s: Section, what: string) {
  if (s.plannedRouteRef === null) throw invalid('kind', `An unplanned section has no route to ${what} along; promote it to a planned route first.`);
  return s.plannedRouteRef;
}

/** Checks the correction against the section and the plan, and turns it into the stored instruction. */
async function resolve(db: Knex, s: Section, input: CorrectionInput): Promise<{ row: NewCorrection; withdraw: StoredCorrection[]; promote?: { ref: string; street: string | null; kind: 'street' | 'crossing' } }> {
  const base: NewCorrection = { kind: input.kind, plannedRouteRef: s.plannedRouteRef, fromChainageM: null, toChainageM: null, targetRouteRef: null, sourceUploadId: null, sigmaM: null, laidOn: null, reason: input.reason, sectionId: s.id };
  const active = (await listCorrections(db, s.projectId, true)).filter((c) => c.plannedRouteRef === s.plannedRouteRef);
  const at = (c: StoredCorrection, kind: string, m: number) => c.kind === kind && c.fromChainageM !== null && Math.abs(c.fromChainageM - m) < 0.5;
  switch (input.kind) {
    case 'split': {
      needsRoute(s, 'split');
      if (input.atChainageM < s.fromChainageM + 1 || input.atChainageM > s.toChainageM - 1) {
        throw invalid('atChainageM', `Split inside the section: between ${fmt(s.fromChainageM + 1)} and ${fmt(s.toChainageM - 1)}.`);
      }
      // a split where a merge was asked for undoes the merge, and the other way round
      return { row: { ...base, fromChainageM: input.atChainageM, toChainageM: input.atChainageM }, withdraw: active.filter((c) => at(c, 'merge', input.atChainageM)) };
    }
    case 'merge': {
      needsRoute(s, 'merge');
      const { before, after } = await neighbourSections(db, s);
      const other = [before, after].find((n) => n?.id === input.withSectionId);
      if (!other) throw invalid('withSectionId', 'Merge with the section just before or just after this one on the same route.');
      if (s.status === 'not_built' || other.status === 'not_built') throw invalid('withSectionId', 'Only built sections merge; a not-built stretch can be counted built on another source instead.');
      const boundary = other === after ? s.toChainageM : s.fromChainageM;
      return { row: { ...base, fromChainageM: boundary, toChainageM: boundary }, withdraw: active.filter((c) => at(c, 'split', boundary)) };
    }
    case 'reassign': {
      const ref = needsRoute(s, 'reassign');
      if (s.status === 'not_built') throw invalid('kind', 'Nothing was observed on a not-built stretch; there is nothing to move to another route.');
      const routes = await listPlannedRoutes(db, s.projectId);
      if (input.toRouteRef === ref) throw invalid('toRouteRef', `The stretch is already on ${ref}; choose another route.`);
      if (!routes.some((r) => r.ref === input.toRouteRef)) throw invalid('toRouteRef', `The current plan has no route '${input.toRouteRef}'.`);
      const [a, b] = rangeIn(s, input.fromChainageM, input.toChainageM);
      return { row: { ...base, fromChainageM: a, toChainageM: b, targetRouteRef: input.toRouteRef }, withdraw: [] };
    }
    case 'mark_built': {
      needsRoute(s, 'count built');
      if (s.status !== 'not_built') throw invalid('kind', 'Only a not-built stretch can be counted built on another source; this one was observed.');
      let sigmaM = DEFAULT_SIGMA_M[input.accuracyClass ?? 'unknown'];
      let laidOn = input.laidOn ?? null;
      if (input.sourceUploadId) {
        const u = await getUpload(db, input.sourceUploadId);
        if (!u || u.projectId !== s.projectId) throw invalid('sourceUploadId', 'That upload is not one of this project\'s.');
        if (!input.accuracyClass) sigmaM = u.sigmaM;
        laidOn ??= u.surveyDate;
      }
      const [a, b] = rangeIn(s, input.fromChainageM, input.toChainageM);
      return { row: { ...base, fromChainageM: a, toChainageM: b, sourceUploadId: input.sourceUploadId ?? null, sigmaM, laidOn }, withdraw: [] };
    }
    case 'not_built_reason': {
      needsRoute(s, 'explain');
      if (s.status !== 'not_built') throw invalid('kind', 'A reason for not built goes on a not-built section.');
      return { row: { ...base, fromChainageM: s.fromChainageM, toChainageM: s.toChainageM }, withdraw: [] };
    }
    case 'promote': {
      if (s.status !== 'unplanned') throw invalid('kind', 'Only an unplanned section can be promoted to a planned route.');
      const all = await listPlannedRoutes(db, s.projectId, true);
      if (all.some((r) => r.ref === input.ref)) throw new AppError('conflict', `The plan already has (or had) a route '${input.ref}'; choose another reference.`, [{ path: 'ref', message: 'Reference in use.' }]);
      return { row: { ...base, plannedRouteRef: input.ref }, withdraw: [], promote: { ref: input.ref, street: input.street || null, kind: input.routeKind } };
    }
  }
}

/**
 * Records an engineer's correction of a section, in the audit log, then reconciles the project again so
 * the correction takes effect; every later run applies it again. Promoting an unplanned section adds a
 * planned route in a new plan version.
 */
export async function correctSection(db: Knex, actor: Principal, sectionId: string, input: CorrectionInput) {
  const correction = await db.transaction(async (trx) => {
    const s = (await getSection(trx, sectionId))!;
    if (s.retiredInRun !== null) throw new AppError('conflict', 'This section was retired by a later reconciliation run; correct its successor.');
    const { row, withdraw, promote } = await resolve(trx, s, input);
    for (const w of withdraw) {
      await withdrawCorrection(trx, w.id, actor.id);
      await writeAudit(trx, auditActor(actor), { projectId: s.projectId, objectType: 'section_correction', objectId: String(w.id), action: 'withdraw', before: w, after: { reason: `undone by a ${input.kind} at the same chainage` } });
    }
    if (promote) await addPromotedRoute(trx, actor, s.projectId, { ...promote, coords: s.coords, sectionId: s.id, reason: input.reason });
    const stored = await insertCorrection(trx, s.projectId, row, actor.id);
    await writeAudit(trx, auditActor(actor), {
      projectId: s.projectId, objectType: 'section', objectId: s.id, action: `correct_${input.kind}`,
      before: { status: s.status, ref: s.plannedRouteRef, fromChainageM: s.fromChainageM, toChainageM: s.toChainageM }, after: { correctionId: stored.id, ...input },
    });
    return stored;
  });
  const job = await requestReconciliation(db, correction.projectId, actor.id);
  return { correction, job };
}

/** Withdraws a correction (it stops applying from the next run, which starts now); promotions stay in the plan. */
export async function withdrawSectionCorrection(db: Knex, actor: Principal, projectId: string, correctionId: number) {
  const correction = await db.transaction(async (trx) => {
    const c = await getCorrection(trx, correctionId);
    if (!c || c.projectId !== projectId) throw new AppError('not_found', 'Correction not found.');
    if (c.withdrawnAt) throw new AppError('conflict', 'This correction was already withdrawn.');
    if (c.kind === 'promote') throw new AppError('conflict', `Route ${c.plannedRouteRef} is part of the plan now; remove it by importing a revised design.`);
    await withdrawCorrection(trx, c.id, actor.id);
    await writeAudit(trx, auditActor(actor), { projectId, objectType: 'section_correction', objectId: String(c.id), action: 'withdraw', before: c });
    return (await getCorrection(trx, c.id))!;
  });
  const job = await requestReconciliation(db, projectId, actor.id);
  return { correction, job };
}
