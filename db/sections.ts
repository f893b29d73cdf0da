import type { Db } from './client';
import type { SectionDraft } from '@/lib/matching/section-types';
import type { LonLat } from '@/lib/matching/types';

/** A stored section: the draft's measures under a lasting id, with its review and run history. */
export interface Section extends Omit<SectionDraft, 'ref'> {
  id: string;
  projectId: string;
  plannedRouteRef: string | null;
  review: 'pending' | 'approved' | 'rejected';
  reviewComment: string;
  derivedFrom: string | null;
  firstRun: number;
  lastRun: number;
  retiredInRun: number | null;
}

const COLUMNS = (db: Db) => [
  'id', 'project_id', 'planned_route_ref', 'status', 'from_chainage_m', 'to_chainage_m', 'length_m', 'max_offset_m', 'p95_offset_m', 'accuracy_m',
  'source_upload_ids', db.raw("to_char(laid_on, 'YYYY-MM-DD') as laid_on"), 'review', 'review_comment', 'derived_from', 'first_run', 'last_run', 'retired_in_run',
  db.raw('ST_AsGeoJSON(geom, 9)::json as geometry'),
];

// rows are loose here and typed from this point on
const toDto = (r: Record<string, any>): Section => ({
  id: r.id, projectId: r.project_id, plannedRouteRef: r.planned_route_ref, status: r.status, fromChainageM: r.from_chainage_m, toChainageM: r.to_chainage_m,
  coords: r.geometry.coordinates, lengthM: r.length_m, maxOffsetM: r.max_offset_m, p95OffsetM: r.p95_offset_m, accuracyM: r.accuracy_m,
  sourceUploadIds: r.source_upload_ids, laidOn: r.laid_on, review: r.review, reviewComment: r.review_comment, derivedFrom: r.derived_from,
  firstRun: r.first_run, lastRun: r.last_run, retiredInRun: r.retired_in_run,
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

function values(db: Db, d: SectionDraft) {
  return {
    planned_route_ref: d.ref, status: d.status, from_chainage_m: d.fromChainageM, to_chainage_m: d.toChainageM,
    geom: db.raw('ST_GeomFromText(?, 4326)', [lineWkt(d.coords)]), length_m: d.lengthM, max_offset_m: d.maxOffsetM, p95_offset_m: d.p95OffsetM,
    accuracy_m: d.accuracyM, source_upload_ids: d.sourceUploadIds, laid_on: d.laidOn,
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

export async function setSectionReview(db: Db, id: string, review: 'approved' | 'rejected', comment: string, userId: string): Promise<void> {
  await db('sections').where({ id }).update({ review, review_comment: comment, reviewed_by: userId, reviewed_at: db.fn.now(), updated_at: db.fn.now() });
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
