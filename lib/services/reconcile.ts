import type { Knex } from 'knex';
import { z } from 'zod';
import { writeAudit, type AuditActor } from '@/db/audit';
import { hasCurrentPlan, listPlannedRoutes } from '@/db/planned';
import { getProject } from '@/db/projects';
import { listCorrections, toMatchingCorrections } from '@/db/corrections';
import { getSection, getSectionsForUpdate, setSectionsReview, insertReconcileRun, listRouteObservations, neighbourSections, replaceRouteObservations, type Section, insertSection, listCurrentSections, nextReconcileRun, retireSections, setSectionReview, updateSectionFromDraft } from '@/db/sections';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import type { Fix } from '@/lib/matching/match-types';
import { matchSections } from '@/lib/matching/match-sections';
import { reconcileProject, type UploadTraces } from '@/lib/matching/reconcile-project';
import { applyExclusions } from '@/lib/matching/apply-exclusions';
import { getUpload, listUploadExclusions, listUploadTraces } from '@/db/uploads';
import { toMatchingExclusion } from './exclusions';
import { getJob } from '@/db/jobs';
import { CHECKS, findingsOnStretch, type CheckFinding } from '@/lib/records/quality-checks';
import { projectFindings } from './quality-checks';
import { sectionRecordsAndChecks } from './section-records';
import { requestHouseholds } from './households';

const SURVEY_GRADE = new Set(['rtk_gnss', 'total_station']);
// what is matched onto the plan: the trench line and road crossings; test pits and depth shots are records
const MATCHED_CONTENT = ['trench', 'road_crossings', 'mixed'];

/** Every stored upload of the project as traces for the matcher, read from PostGIS, less what the engineer left out. */
async function loadTraces(db: Knex, projectId: string): Promise<UploadTraces[]> {
  const uploads = await db('uploads').where({ project_id: projectId, status: 'stored' }).whereIn('content', MATCHED_CONTENT).select('id', 'sigma_m', 'accuracy_class', db.raw("to_char(survey_date, 'YYYY-MM-DD') as survey_date"));
  const out: UploadTraces[] = [];
  for (const u of uploads) {
    const traces: Fix[][] = await listUploadTraces(db, u.id);
    const exclusions = (await listUploadExclusions(db, u.id)).map(toMatchingExclusion);
    out.push({ uploadId: u.id, sigmaM: u.sigma_m, surveyGrade: SURVEY_GRADE.has(u.accuracy_class), laidOn: u.survey_date, traces: traces.flatMap((t) => applyExclusions(t, exclusions)) });
  }
  return out;
}

/**
 * One reconciliation run: match every stored upload onto the current plan, build the sections, and give
 * them lasting ids — the same stretch keeps its id, a split or extension links to where it came from, a
 * stretch no longer found is retired (kept, with what hangs off it). A geometry change resets an approval,
 * with the reason in the audit log.
 */
export async function runReconciliation(db: Knex, projectId: string, jobId: string | null, actor: AuditActor, progress: (f: number, m: string) => Promise<void>) {
  const project = (await getProject(db, projectId))!;
  const routes = await listPlannedRoutes(db, projectId);
  const uploads = await loadTraces(db, projectId);
  const corrections = toMatchingCorrections(await listCorrections(db, projectId, true));
  await progress(0.1, `Matching ${uploads.length} uploads onto ${routes.length} routes`);
  const { drafts, stats, observations } = await reconcileProject(routes, uploads, { toleranceM: project.lateralToleranceM, corrections });
  await progress(0.8, `Writing ${drafts.length} sections`);
  return db.transaction(async (trx) => {
    const run = await nextReconcileRun(trx, projectId);
    const existing = await listCurrentSections(trx, projectId);
    const ids = matchSections(drafts, existing.map((s) => ({ id: s.id, ref: s.plannedRouteRef, fromChainageM: s.fromChainageM, toChainageM: s.toChainageM, coords: s.coords, status: s.status })));
    const byId = new Map(existing.map((s) => [s.id, s]));
    let created = 0;
    let resets = 0;
    for (const [i, d] of drafts.entries()) {
      const who = ids[i];
      if (who.keepId) {
        const old = byId.get(who.keepId)!;
        const reset = who.changed && old.review !== 'pending';
        await updateSectionFromDraft(trx, who.keepId, d, run, reset);
        if (reset) {
          resets++;
          await writeAudit(trx, actor, {
            projectId, objectType: 'section', objectId: who.keepId, action: 'review_reset',
            before: { review: old.review, status: old.status, lengthM: old.lengthM }, after: { review: 'pending', status: d.status, lengthM: d.lengthM, reason: `reconciliation run ${run} changed the section's geometry or status` },
          });
        }
      } else {
        created++;
        await insertSection(trx, projectId, d, run, who.derivedFrom);
      }
    }
    const kept = new Set(ids.map((x) => x.keepId).filter(Boolean));
    const retired = existing.filter((s) => !kept.has(s.id)).map((s) => s.id);
    await retireSections(trx, retired, run);
    await replaceRouteObservations(trx, projectId, run, observations);
    const summary = { ...stats, sections: drafts.length, created, retired: retired.length, reviewResets: resets };
    await insertReconcileRun(trx, projectId, run, jobId, summary);
    await writeAudit(trx, actor, { projectId, objectType: 'reconcile_run', objectId: String(run), action: 'run', after: summary });
    return { run, ...summary };
  });
}

const decisionSchema = z.enum(['approve', 'reject', 'acknowledge']);
const REVIEW_OF = { approve: 'approved', reject: 'rejected', acknowledge: 'acknowledged' } as const;
const needsComment = (v: { decision: z.infer<typeof decisionSchema>; comment: string }) => v.decision === 'approve' || v.comment.length >= 3;
const COMMENT_NEEDED = { message: 'Say why: a rejection or an acknowledged not-built stretch needs a reason.', path: ['comment'] };

export const reviewSchema = z.object({ decision: decisionSchema, comment: z.string().trim().max(2000).default('') }).refine(needsComment, COMMENT_NEEDED);

export const bulkReviewSchema = z
  .object({
    sectionIds: z.array(z.uuid('Each section id is a UUID.')).min(1, 'Pick at least one section.').max(2000, 'At most 2000 sections at a time.'),
    decision: decisionSchema,
    comment: z.string().trim().max(2000).default(''),
  })
  .refine(needsComment, COMMENT_NEEDED);

/**
 * Why a section cannot take a decision, or null when it can: a retired stretch is reviewed through its
 * successor; a not-built stretch has nothing laid to approve (it is acknowledged, with a reason, or
 * rejected), and only a not-built stretch can be acknowledged.
 */
export function reviewRefusal(s: Pick<Section, 'status' | 'retiredInRun'>, decision: z.infer<typeof decisionSchema>): string | null {
  if (s.retiredInRun !== null) return 'This section was retired by a later reconciliation run; review its successor.';
  if (decision === 'approve' && s.status === 'not_built') return 'A not-built stretch has nothing laid to approve: acknowledge it with the reason, or reject it.';
  if (decision === 'acknowledge' && s.status !== 'not_built') return 'Only a not-built stretch is acknowledged; a built one is approved or rejected.';
  return null;
}

/** The open quality checks of each section about to be approved, by section id (sections with none left out). */
async function openChecksOf(trx: Knex.Transaction, projectId: string, sections: Section[]): Promise<Map<string, CheckFinding[]>> {
  const project = (await getProject(trx, projectId))!;
  const all = await projectFindings(trx, project);
  const out = new Map<string, CheckFinding[]>();
  for (const s of sections) {
    const open = findingsOnStretch(all, s.plannedRouteRef, s.fromChainageM, s.toChainageM);
    if (open.length) out.set(s.id, open);
  }
  return out;
}

const checkNames = (open: CheckFinding[]) => [...new Set(open.map((f) => CHECKS[f.check].label.toLowerCase()))].join('; ');
const OPEN_CHECKS_NEED_COMMENT = (n: number, open: CheckFinding[]) =>
  `This section has ${n} open quality check${n === 1 ? '' : 's'} (${checkNames(open)}): confirm the approval with a comment saying why it is acceptable.`;

export async function reviewSection(db: Knex, actor: Principal, sectionId: string, input: z.infer<typeof reviewSchema>) {
  const out = await reviewSectionInTrx(db, actor, sectionId, input);
  // passed and approved follows the reviews
  await requestHouseholds(db, out.projectId, actor.id);
  return out;
}

async function reviewSectionInTrx(db: Knex, actor: Principal, sectionId: string, input: z.infer<typeof reviewSchema>) {
  return db.transaction(async (trx) => {
    const [before] = await getSectionsForUpdate(trx, [sectionId]);
    const refusal = reviewRefusal(before, input.decision);
    if (refusal) throw new AppError('conflict', refusal);
    const open = input.decision === 'approve' ? ((await openChecksOf(trx, before.projectId, [before])).get(sectionId) ?? []) : [];
    if (open.length && input.comment.length < 3) {
      throw new AppError('invalid', OPEN_CHECKS_NEED_COMMENT(open.length, open), [{ path: 'comment', message: OPEN_CHECKS_NEED_COMMENT(open.length, open) }]);
    }
    const review = REVIEW_OF[input.decision];
    await setSectionReview(trx, sectionId, review, input.comment, actor.id);
    await writeAudit(trx, auditActor(actor), { projectId: before.projectId, objectType: 'section', objectId: sectionId, action: `review_${review}`, before: { review: before.review }, after: { review, comment: input.comment, ...(open.length ? { openChecks: open.map((f) => f.message) } : {}) } });
    return (await getSection(trx, sectionId))!;
  });
}

/**
 * Many sections of one project take the same decision in one transaction, one audit entry each. Any
 * section that is not the project's, is retired, or does not fit the decision refuses the whole request,
 * each listed in the error's details: nothing is half reviewed.
 */
export async function reviewSections(db: Knex, actor: Principal, projectId: string, input: z.infer<typeof bulkReviewSchema>) {
  const ids = [...new Set(input.sectionIds)];
  const out = await db.transaction(async (trx) => {
    const found = new Map((await getSectionsForUpdate(trx, ids)).map((s) => [s.id, s]));
    const problems: { path: string; message: string }[] = [];
    ids.forEach((id, i) => {
      const s = found.get(id);
      const refusal = !s || s.projectId !== projectId ? 'No such section in this project.' : reviewRefusal(s, input.decision);
      if (refusal) problems.push({ path: `sectionIds.${i}`, message: `${s ? `${s.plannedRouteRef ?? 'unplanned'} ${s.fromChainageM.toFixed(0)}–${s.toChainageM.toFixed(0)} m` : id}: ${refusal}` });
    });
    if (problems.length) throw new AppError('conflict', `${problems.length} of the ${ids.length} sections cannot be ${REVIEW_OF[input.decision]}; nothing was changed.`, problems);
    const open = input.decision === 'approve' ? await openChecksOf(trx, projectId, [...found.values()]) : new Map<string, CheckFinding[]>();
    if (open.size && input.comment.length < 3) {
      const details = ids.flatMap((id, i) => {
        const f = open.get(id);
        const s = found.get(id)!;
        return f ? [{ path: `sectionIds.${i}`, message: `${s.plannedRouteRef ?? 'unplanned'} ${s.fromChainageM.toFixed(0)}–${s.toChainageM.toFixed(0)} m: ${OPEN_CHECKS_NEED_COMMENT(f.length, f)}` }] : [];
      });
      throw new AppError('invalid', `${open.size} of the ${ids.length} sections have open quality checks: approve them with a comment saying why; nothing was changed.`, [{ path: 'comment', message: `${open.size} of the ${ids.length} sections have open quality checks: say why you approve them.` }, ...details]);
    }
    const review = REVIEW_OF[input.decision];
    await setSectionsReview(trx, ids, review, input.comment, actor.id);
    const who = auditActor(actor);
    for (const id of ids) {
      const openHere = open.get(id);
      await writeAudit(trx, who, { projectId, objectType: 'section', objectId: id, action: `review_${review}`, before: { review: found.get(id)!.review }, after: { review, comment: input.comment, bulk: ids.length, ...(openHere ? { openChecks: openHere.map((f) => f.message) } : {}) } });
    }
    return { reviewed: ids.length, review };
  });
  // passed and approved follows the reviews
  await requestHouseholds(db, projectId, actor.id);
  return out;
}

/** Settled sections are approved, or acknowledged as not built; a project whose every section is settled is fully approved. */
export function reviewProgress(sections: Pick<Section, 'review' | 'status'>[]) {
  const count = (r: Section['review']) => sections.filter((s) => s.review === r).length;
  const approved = count('approved');
  const acknowledged = count('acknowledged');
  const settled = approved + acknowledged;
  return { total: sections.length, approved, acknowledged, rejected: count('rejected'), pending: count('pending'), settled, fullyApproved: sections.length > 0 && settled === sections.length };
}

/** Queues a reconciliation unless one is already waiting: uploads in quick succession share one run. */
export async function requestReconciliation(db: Knex, projectId: string, requestedBy: string | null) {
  // loaded here, not at the top: the job kinds import this module, and the queue imports the kinds
  const { enqueueJob } = await import('@/lib/jobs/queue');
  const waiting = await db('jobs').where({ project_id: projectId, kind: 'reconcile', status: 'queued' }).orderBy('created_at').first('id');
  if (waiting) return (await getJob(db, waiting.id))!;
  return enqueueJob(db, { projectId, kind: 'reconcile', input: { requestedBy }, createdBy: requestedBy });
}

/** A new stored upload changes the record: once there is a plan, the project is reconciled again in the background. */
export async function reconcileAfterUpload(db: Knex, projectId: string, userId: string): Promise<void> {
  if (await hasCurrentPlan(db, projectId)) await requestReconciliation(db, projectId, userId);
}

/** The current sections as an RFC 7946 FeatureCollection; each feature's id is the section id. */
export function sectionFeature(s: Section) {
  return {
    type: 'Feature' as const,
    id: s.id,
    geometry: { type: 'LineString' as const, coordinates: s.coords },
    properties: {
      plannedRouteRef: s.plannedRouteRef,
      fromChainageM: round(s.fromChainageM),
      toChainageM: round(s.toChainageM),
      lengthM: round(s.lengthM),
      status: s.status,
      // null where nothing measured it: a not-built stretch, an unplanned line's offset from a plan
      maxOffsetM: roundOrNull(s.maxOffsetM),
      p95OffsetM: roundOrNull(s.p95OffsetM),
      accuracyM: roundOrNull(s.accuracyM),
      sourceUploadIds: s.sourceUploadIds,
      laidOn: s.laidOn,
      review: s.review,
    },
  };
}

const round = (x: number) => Math.round(x * 1000) / 1000;
const roundOrNull = (x: number | null) => (x === null ? null : round(x));

/** Planned, built and covered metres: built counts as-planned and deviating stretches of planned routes. */
export function sectionTotals(sections: Section[]) {
  const planned = sections.filter((s) => s.plannedRouteRef !== null).reduce((n, s) => n + (s.toChainageM - s.fromChainageM), 0);
  const builtPlanned = sections.filter((s) => s.status === 'as_planned' || s.status === 'deviates').reduce((n, s) => n + (s.toChainageM - s.fromChainageM), 0);
  const laid = sections.filter((s) => s.status !== 'not_built').reduce((n, s) => n + s.lengthM, 0);
  return { plannedM: round(planned), builtM: round(builtPlanned), laidM: round(laid), coverage: planned > 0 ? round(builtPlanned / planned) : 0 };
}

/**
 * Everything the section's page shows: the section, its planned route, the matched observations of the
 * latest run within its chainages (for the offset plot), its source uploads, its neighbours along the
 * route, and the corrections that shaped it or were made on it.
 */
export async function sectionDetail(db: Knex, sectionId: string) {
  const s = (await getSection(db, sectionId))!;
  const project = (await getProject(db, s.projectId))!;
  const route = s.plannedRouteRef === null ? null : (await listPlannedRoutes(db, s.projectId, true)).find((r) => r.ref === s.plannedRouteRef) ?? null;
  const observations = s.plannedRouteRef === null ? [] : await listRouteObservations(db, s.projectId, s.plannedRouteRef, s.fromChainageM - 10, s.toChainageM + 10);
  const uploadIds = [...new Set([...s.sourceUploadIds, ...observations.map((o) => o.uploadId)])];
  const uploads = (await Promise.all(uploadIds.map((id) => getUpload(db, id)))).filter((u): u is NonNullable<typeof u> => !!u);
  const sources = uploads.map((u) => ({ id: u.id, fileName: u.fileName, accuracyClass: u.accuracyClass, sigmaM: u.sigmaM, surveyDate: u.surveyDate, crew: u.crew, status: u.status, wonHere: s.sourceUploadIds.includes(u.id) }));
  const { before, after } = await neighbourSections(db, s);
  const corrections = (await listCorrections(db, s.projectId)).filter((c) => c.sectionId === s.id || s.correctionIds.includes(c.id));
  const { records, openChecks } = await sectionRecordsAndChecks(db, project, s);
  return {
    section: { ...sectionFeature(s).properties, id: s.id, reviewComment: s.reviewComment, note: s.note, derivedFrom: s.derivedFrom, firstRun: s.firstRun, lastRun: s.lastRun, retiredInRun: s.retiredInRun, geometry: { type: 'LineString' as const, coordinates: s.coords } },
    route: route && { ref: route.ref, street: route.street, ducts: route.ducts, kind: route.kind, lengthM: round(route.lengthM), removedInVersion: route.removedInVersion, geometry: { type: 'LineString' as const, coordinates: route.coords } },
    toleranceM: project.lateralToleranceM,
    observations,
    sources,
    neighbours: { before: before && { id: before.id, status: before.status, fromChainageM: before.fromChainageM, toChainageM: before.toChainageM }, after: after && { id: after.id, status: after.status, fromChainageM: after.fromChainageM, toChainageM: after.toChainageM } },
    corrections,
    records,
    openChecks,
  };
}
export type SectionDetail = Awaited<ReturnType<typeof sectionDetail>>;
