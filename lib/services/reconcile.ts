import type { Knex } from 'knex';
import { z } from 'zod';
import { writeAudit, type AuditActor } from '@/db/audit';
import { hasCurrentPlan, listPlannedRoutes } from '@/db/planned';
import { getProject } from '@/db/projects';
import { listCorrections, toMatchingCorrections } from '@/db/corrections';
import { getSection, insertReconcileRun, listRouteObservations, neighbourSections, replaceRouteObservations, type Section, insertSection, listCurrentSections, nextReconcileRun, retireSections, setSectionReview, updateSectionFromDraft } from '@/db/sections';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import type { Fix } from '@/lib/matching/match-types';
import { matchSections } from '@/lib/matching/match-sections';
import { reconcileProject, type UploadTraces } from '@/lib/matching/reconcile-project';
import { applyExclusions, type Exclusion } from '@/lib/matching/apply-exclusions';
import { getUpload, insertUploadExclusion, listUploadExclusions } from '@/db/uploads';
import { getJob } from '@/db/jobs';

const SURVEY_GRADE = new Set(['rtk_gnss', 'total_station']);
// what is matched onto the plan: the trench line and road crossings; test pits and depth shots are records
const MATCHED_CONTENT = ['trench', 'road_crossings', 'mixed'];

/** Every stored upload of the project as traces for the matcher, read from PostGIS. */
async function loadTraces(db: Knex, projectId: string): Promise<UploadTraces[]> {
  const uploads = await db('uploads').where({ project_id: projectId, status: 'stored' }).whereIn('content', MATCHED_CONTENT).select('id', 'sigma_m', 'accuracy_class', db.raw("to_char(survey_date, 'YYYY-MM-DD') as survey_date"));
  const out: UploadTraces[] = [];
  for (const u of uploads) {
    const rows = await db('upload_features').where({ upload_id: u.id }).orderBy('seq').select('kind', 'times', db.raw('ST_AsGeoJSON(geom, 9)::json as geometry'));
    const traces: Fix[][] = [];
    let points: Fix[] = [];
    let seq = 0;
    for (const r of rows) {
      if (r.kind === 'line') {
        const times: (Date | null)[] | null = r.times;
        traces.push(r.geometry.coordinates.map((c: number[], i: number) => ({ lon: c[0], lat: c[1], t: times?.[i] ? times[i]!.getTime() / 1000 : null, seq: seq++ })));
      } else {
        // loose points of one upload are one survey run, in file order
        const c = r.geometry.coordinates;
        points.push({ lon: c[0], lat: c[1], t: r.times?.[0] ? r.times[0].getTime() / 1000 : null, seq: seq++ });
      }
    }
    if (points.length >= 2) traces.push(points);
    points = [];
    const exclusions: Exclusion[] = (await listUploadExclusions(db, u.id)).map((e) =>
      e.kind === 'time' ? { kind: 'time', fromT: Date.parse(String(e.from)) / 1000, toT: Date.parse(String(e.to)) / 1000 } : { kind: 'distance', fromM: Number(e.from), toM: Number(e.to) },
    );
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

export const reviewSchema = z.object({ decision: z.enum(['approve', 'reject']), comment: z.string().trim().max(2000).default('') }).refine((v) => v.decision === 'approve' || v.comment.length >= 3, {
  message: 'Say why the section is rejected.',
  path: ['comment'],
});

export async function reviewSection(db: Knex, actor: Principal, sectionId: string, input: z.infer<typeof reviewSchema>) {
  return db.transaction(async (trx) => {
    const before = (await getSection(trx, sectionId))!;
    if (before.retiredInRun !== null) throw new AppError('conflict', 'This section was retired by a later reconciliation run; review its successor.');
    const review = input.decision === 'approve' ? 'approved' : 'rejected';
    await setSectionReview(trx, sectionId, review, input.comment, actor.id);
    await writeAudit(trx, auditActor(actor), { projectId: before.projectId, objectType: 'section', objectId: sectionId, action: `review_${review}`, before: { review: before.review }, after: { review, comment: input.comment } });
    return (await getSection(trx, sectionId))!;
  });
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
      maxOffsetM: round(s.maxOffsetM),
      p95OffsetM: round(s.p95OffsetM),
      accuracyM: round(s.accuracyM),
      sourceUploadIds: s.sourceUploadIds,
      laidOn: s.laidOn,
      review: s.review,
    },
  };
}

const round = (x: number) => Math.round(x * 1000) / 1000;

/** Planned, built and covered metres: built counts as-planned and deviating stretches of planned routes. */
export function sectionTotals(sections: Section[]) {
  const planned = sections.filter((s) => s.plannedRouteRef !== null).reduce((n, s) => n + (s.toChainageM - s.fromChainageM), 0);
  const builtPlanned = sections.filter((s) => s.status === 'as_planned' || s.status === 'deviates').reduce((n, s) => n + (s.toChainageM - s.fromChainageM), 0);
  const laid = sections.filter((s) => s.status !== 'not_built').reduce((n, s) => n + s.lengthM, 0);
  return { plannedM: round(planned), builtM: round(builtPlanned), laidM: round(laid), coverage: planned > 0 ? round(builtPlanned / planned) : 0 };
}

export const exclusionSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('time'), from: z.iso.datetime({ offset: true, message: 'Give the start as an ISO time, e.g. 2026-11-03T09:40:00Z.' }), to: z.iso.datetime({ offset: true, message: 'Give the end as an ISO time.' }), reason: z.string().trim().min(3, 'Say why this stretch is left out.').max(500) }),
  z.object({ kind: z.literal('distance'), from: z.number().min(0, 'Metres from the start of each trace, 0 or more.'), to: z.number().min(0), reason: z.string().trim().min(3, 'Say why this stretch is left out.').max(500) }),
]).refine((e) => (e.kind === 'time' ? Date.parse(e.from) < Date.parse(e.to) : e.from < e.to), { message: 'The range must end after it starts.', path: ['to'] });

/** Keeps a time or distance range of an upload out of matching (the original keeps it), audited, then reconciles. */
export async function excludeFromMatching(db: Knex, actor: Principal, projectId: string, uploadId: string, input: z.infer<typeof exclusionSchema>) {
  const id = await db.transaction(async (trx) => {
    const id = await insertUploadExclusion(trx, uploadId, input, actor.id);
    await writeAudit(trx, auditActor(actor), { projectId, objectType: 'upload', objectId: uploadId, action: 'exclude_range', after: input });
    return id;
  });
  const job = await requestReconciliation(db, projectId, actor.id);
  return { exclusion: { id, ...input }, job };
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
  return {
    section: { ...sectionFeature(s).properties, id: s.id, reviewComment: s.reviewComment, note: s.note, derivedFrom: s.derivedFrom, firstRun: s.firstRun, lastRun: s.lastRun, retiredInRun: s.retiredInRun, geometry: { type: 'LineString' as const, coordinates: s.coords } },
    route: route && { ref: route.ref, street: route.street, ducts: route.ducts, kind: route.kind, lengthM: round(route.lengthM), removedInVersion: route.removedInVersion, geometry: { type: 'LineString' as const, coordinates: route.coords } },
    toleranceM: project.lateralToleranceM,
    observations,
    sources,
    neighbours: { before: before && { id: before.id, status: before.status, fromChainageM: before.fromChainageM, toChainageM: before.toChainageM }, after: after && { id: after.id, status: after.status, fromChainageM: after.fromChainageM, toChainageM: after.toChainageM } },
    corrections,
  };
}
export type SectionDetail = Awaited<ReturnType<typeof sectionDetail>>;
