import type { Db } from './client';
import type { SectionDraft } from '@/lib/matching/section-types';
import type { LonLat } from '@/lib/matching/types';

export type SectionReview = 'pending' | 'approved' | 'rejected' | 'acknowledged';

/**
 * A stored section: the draft's measures under a lasting id, with its review and run history. A figure
 * nothing measured is null, never 0: a not-built stretch has no offset and no accuracy, an unplanned line
 * no offset from a plan.
 */
export interface Section extends Omit<SectionDraft, 'ref' | 'note' | 'correctionIds' | 'maxOffsetM' | 'p95OffsetM' | 'accuracyM' | 'offsetsUnmeasured'> {
  maxOffsetM: number | null;
  p95OffsetM: number | null;
  /** 95 % horizontal radius of the as-built line's position (m) */
  accuracyM: number | null;
  note: string | null;
  correctionIds: number[];
  id: string;
  projectId: string;
  plannedRouteRef: string | null;
  review: SectionReview;
  reviewComment: string;
  derivedFrom: string | null;
  firstRun: number;
  lastRun: number;
  retiredInRun: number | null;
}

const COLUMNS = (db: Db) => [
  'id', 'project_id', 'planned_route_ref', 'status', 'from_chainage_m', 'to_chainage_m', 'length_m', 'max_offset_m', 'p95_offset_m', 'accuracy_m',
  'source_upload_ids', db.raw("to_char(laid_on, 'YYYY-MM-DD') as laid_on"), 'review', 'review_comment', 'derived_from', 'first_run', 'last_run', 'retired_in_run',
  'note', 'correction_ids',
  db.raw('ST_AsGeoJSON(geom, 9)::json as geometry'),
];

// rows are loose here and typed from this point on
const toDto = (r: Record<string, any>): Section => ({
  id: r.id, projectId: r.project_id, plannedRouteRef: r.planned_route_ref, status: r.status, fromChainageM: r.from_chainage_m, toChainageM: r.to_chainage_m,
  coords: r.geometry.coordinates, lengthM: r.length_m, maxOffsetM: r.max_offset_m, p95OffsetM: r.p95_offset_m, accuracyM: r.accuracy_m,
  sourceUploadIds: r.source_upload_ids, laidOn: r.laid_on, review: r.review, reviewComment: r.review_comment, derivedFrom: r.derived_from,
  firstRun: r.first_run, lastRun: r.last_run, retiredInRun: r.retired_in_run, note: r.note, correctionIds: (r.correction_ids ?? []).map(Number),
});

export async function listCurrentSections(db: Db, projectId: string): Promise<Section[]> {
  const rows = await db('sections').where({ project_id: projectId }).whereNull('retired_in_run').select(COLUMNS(db)).orderByRaw('planned_route_ref nulls last, from_chainage_m');
  return rows.map(toDto);
}

export async function getSection(db: Db, id: string): Promise<Section | undefined> {
  const row = await db('sections').where({ id }).first(COLUMNS(db));
  return row && toDto(row);
}

const lineWkt = (coords: LonLat[]) => `LINESTRING(${coords.map((c) => `${c[0]} ${c[1]}`).join(',')})`;

/** The draft's figures as stored: null where nothing was measured (the builder writes 0 there). */
export function measuredFigures(d: Pick<SectionDraft, 'status' | 'maxOffsetM' | 'p95OffsetM' | 'accuracyM' | 'offsetsUnmeasured'>): { maxOffsetM: number | null; p95OffsetM: number | null; accuracyM: number | null } {
  if (d.status === 'not_built') return { maxOffsetM: null, p95OffsetM: null, accuracyM: null };
  // an unplanned line has no plan to be offset from; a stretch counted built on another source, no fixes
  if (d.status === 'unplanned' || d.offsetsUnmeasured) return { maxOffsetM: null, p95OffsetM: null, accuracyM: d.accuracyM };
  return { maxOffsetM: d.maxOffsetM, p95OffsetM: d.p95OffsetM, accuracyM: d.accuracyM };
}

function values(db: Db, d: SectionDraft) {
  const m = measuredFigures(d);
  return {
    planned_route_ref: d.ref, status: d.status, from_chainage_m: d.fromChainageM, to_chainage_m: d.toChainageM,
    geom: db.raw('ST_GeomFromText(?, 4326)', [lineWkt(d.coords)]), length_m: d.lengthM, max_offset_m: m.maxOffsetM, p95_offset_m: m.p95OffsetM,
    accuracy_m: m.accuracyM, source_upload_ids: d.sourceUploadIds, laid_on: d.laidOn, note: d.note ?? null, correction_ids: d.correctionIds ?? [],
  };
}

export async function insertSection(db: Db, projectId: string, d: SectionDraft, run: number, derivedFrom: string | null): Promise<string> {
  const [{ id }] = await db('sections').insert({ ...values(db, d), project_id: projectId, first_run: run, last_run: run, derived_from: derivedFrom }).returning('id');
  return id;
}

export async function updateSectionFromDraft(db: Db, id: string, d: SectionDraft, run: number, resetReview: boolean): Promise<void> {
  const v: Record<string, unknown> = { ...values(db, d), last_run: run, updated_at: db.fn.now() };
  if (resetReview) Object.assign(v, { review: 'pending', reviewed_by: null, reviewed_at: null });
  await db('sections').where({ id }).update(v);
}

export async function retireSections(db: Db, ids: string[], run: number): Promise<void> {
  if (ids.length) await db('sections').whereIn('id', ids).update({ retired_in_run: run, updated_at: db.fn.now() });
}

export async function setSectionReview(db: Db, id: string, review: Exclude<SectionReview, 'pending'>, comment: string, userId: string): Promise<void> {
  await db('sections').where({ id }).update({ review, review_comment: comment, reviewed_by: userId, reviewed_at: db.fn.now(), updated_at: db.fn.now() });
}

/** Several sections take the same review in one statement (the caller writes an audit entry for each). */
export async function setSectionsReview(db: Db, ids: string[], review: Exclude<SectionReview, 'pending'>, comment: string, userId: string): Promise<void> {
  if (ids.length) await db('sections').whereIn('id', ids).update({ review, review_comment: comment, reviewed_by: userId, reviewed_at: db.fn.now(), updated_at: db.fn.now() });
}

/** Sections by id, locked for a review: a reconciliation run cannot rewrite them until the review commits. */
export async function getSectionsForUpdate(db: Db, ids: string[]): Promise<Section[]> {
  if (ids.length === 0) return [];
  const rows = await db('sections').whereIn('id', ids).forUpdate().select(COLUMNS(db));
  return rows.map(toDto);
}

/** The next run number of the project, under a lock on the project row: one reconciliation at a time. */
export async function nextReconcileRun(db: Db, projectId: string): Promise<number> {
  // NO KEY UPDATE: serialises runs without blocking uploads, whose foreign-key checks take KEY SHARE on the project
  await db('projects').where({ id: projectId }).forNoKeyUpdate().first('id');
  const [row] = await db('reconcile_runs').where({ project_id: projectId }).max<{ max: number | null }[]>('run as max');
  return (row?.max ?? 0) + 1;
}

export async function insertReconcileRun(db: Db, projectId: string, run: number, jobId: string | null, stats: object): Promise<void> {
  await db('reconcile_runs').insert({ project_id: projectId, run, job_id: jobId, stats: JSON.stringify(stats) });
}

/** The sections on either side of a section along its route (current ones), for merging and the detail page. */
export async function neighbourSections(db: Db, s: Section): Promise<{ before: Section | undefined; after: Section | undefined }> {
  if (s.plannedRouteRef === null) return { before: undefined, after: undefined };
  const same = (await listCurrentSections(db, s.projectId)).filter((x) => x.plannedRouteRef === s.plannedRouteRef);
  const i = same.findIndex((x) => x.id === s.id);
  return { before: i > 0 ? same[i - 1] : undefined, after: i >= 0 ? same[i + 1] : undefined };
}

/** The latest run's matched observations replace the previous run's. */
export async function replaceRouteObservations(db: Db, projectId: string, run: number, series: { ref: string; uploadId: string; chainageM: number[]; offsetM: number[]; timeS?: (number | null)[] }[]): Promise<void> {
  await db('route_observations').where({ project_id: projectId }).delete();
  const rows = series.map((o) => ({ project_id: projectId, run, planned_route_ref: o.ref, upload_id: o.uploadId, chainage_m: o.chainageM, offset_m: o.offsetM, time_s: o.timeS ?? null }));
  // a few routes at a time: a long trace's arrays make large rows
  for (let i = 0; i < rows.length; i += 20) await db('route_observations').insert(rows.slice(i, i + 20));
}

/** Matched observations on a route between two chainages, per upload, from the latest run; times in epoch seconds (null where unknown). */
export async function listRouteObservations(db: Db, projectId: string, ref: string, fromM: number, toM: number): Promise<{ uploadId: string; chainageM: number[]; offsetM: number[]; timeS: (number | null)[] }[]> {
  const rows = await db('route_observations').where({ project_id: projectId, planned_route_ref: ref }).select('upload_id', 'chainage_m', 'offset_m', 'time_s').orderBy('upload_id');
  return rows.map((r) => {
    const keep = (r.chainage_m as number[]).map((c, i) => i).filter((i) => r.chainage_m[i] >= fromM && r.chainage_m[i] <= toM);
    const times = r.time_s as (number | null)[] | null;
    return { uploadId: r.upload_id, chainageM: keep.map((i) => r.chainage_m[i]), offsetM: keep.map((i) => r.offset_m[i]), timeS: keep.map((i) => times?.[i] ?? null) };
  }).filter((o) => o.chainageM.length > 0);
}
