import type { Knex } from 'knex';
import type { Db } from './client';

// The owner's review of handover packages and the comments on them (issue 16, helper E2). The package
// itself (building, files) is db/handovers.ts; this module reads the `handovers` rows it needs on its own.

export type HandoverStatus = 'building' | 'issued' | 'failed' | 'accepted' | 'returned';

export interface HandoverComment {
  id: number;
  handoverId: string;
  sectionId: string | null;
  /** the section's route and stretch, for the page and the e-mail ("S-1 0–120 m"), null for a general comment */
  sectionLabel: string | null;
  kind: 'return' | 'answer';
  answersId: number | null;
  text: string;
  authorId: string | null;
  authorName: string | null;
  createdAt: string;
}

export interface HandoverSummary {
  id: string;
  projectId: string;
  revision: number;
  status: HandoverStatus;
  scope: unknown;
  note: string;
  jobId: string | null;
  failureReason: string | null;
  fileName: string | null;
  sizeBytes: number | null;
  sha256: string | null;
  manifest: unknown;
  changeReport: unknown;
  createdBy: string | null;
  createdByName: string | null;
  createdAt: string;
  issuedAt: string | null;
  reviewedBy: string | null;
  reviewedByName: string | null;
  reviewedAt: string | null;
  reviewComment: string;
  /** section ids the package holds (from its snapshot), for the review form's section picker */
  sectionIds: string[];
  comments: HandoverComment[];
}

interface Row {
  id: string; project_id: string; revision: number; status: HandoverStatus; scope: unknown; note: string; job_id: string | null;
  failure_reason: string | null; file_name: string | null; size_bytes: string | number | null; sha256: string | null; manifest: unknown;
  change_report: unknown; snapshot: unknown; created_by: string | null; created_by_name: string | null; created_at: Date; issued_at: Date | null;
  reviewed_by: string | null; reviewed_by_name: string | null; reviewed_at: Date | null; review_comment: string;
}

/**
 * The section ids a package's snapshot names. The snapshot is written by the package's builder; sections are
 * read from `sections` (array of objects with `id`, or of ids) or from an object keyed by section id.
 */
export function snapshotSectionIds(snapshot: unknown): string[] {
  const s = (snapshot && typeof snapshot === 'object' ? (snapshot as Record<string, unknown>).sections : null) as unknown;
  if (Array.isArray(s)) return s.map((x) => (typeof x === 'string' ? x : x && typeof x === 'object' ? String((x as { id?: unknown }).id ?? '') : '')).filter(Boolean);
  if (s && typeof s === 'object') return Object.keys(s);
  return [];
}

const base = (db: Db) =>
  db('handovers as h')
    .leftJoin('users as cu', 'cu.id', 'h.created_by')
    .leftJoin('users as ru', 'ru.id', 'h.reviewed_by')
    .select('h.*', 'cu.name as created_by_name', 'ru.name as reviewed_by_name');

const toSummary = (r: Row, comments: HandoverComment[]): HandoverSummary => ({
  id: r.id,
  projectId: r.project_id,
  revision: r.revision,
  status: r.status,
  scope: r.scope,
  note: r.note,
  jobId: r.job_id,
  failureReason: r.failure_reason,
  fileName: r.file_name,
  sizeBytes: r.size_bytes === null ? null : Number(r.size_bytes),
  sha256: r.sha256,
  manifest: r.manifest,
  changeReport: r.change_report,
  createdBy: r.created_by,
  createdByName: r.created_by_name,
  createdAt: r.created_at.toISOString(),
  issuedAt: r.issued_at ? r.issued_at.toISOString() : null,
  reviewedBy: r.reviewed_by,
  reviewedByName: r.reviewed_by_name,
  reviewedAt: r.reviewed_at ? r.reviewed_at.toISOString() : null,
  reviewComment: r.review_comment,
  sectionIds: snapshotSectionIds(r.snapshot),
  comments,
});

export async function listCommentsOf(db: Db, handoverIds: string[]): Promise<HandoverComment[]> {
  if (handoverIds.length === 0) return [];
  const rows = await db('handover_comments as c')
    .leftJoin('users as u', 'u.id', 'c.author_id')
    .leftJoin('sections as s', 's.id', 'c.section_id')
    .whereIn('c.handover_id', handoverIds)
    .orderBy([{ column: 'c.created_at' }, { column: 'c.id' }])
    .select('c.*', 'u.name as author_name', 's.planned_route_ref', 's.from_chainage_m', 's.to_chainage_m');
  return rows.map((r: Record<string, unknown>) => ({
    id: Number(r.id),
    handoverId: r.handover_id as string,
    sectionId: (r.section_id as string | null) ?? null,
    sectionLabel: r.section_id ? sectionLabel(r.planned_route_ref as string | null, Number(r.from_chainage_m), Number(r.to_chainage_m)) : null,
    kind: r.kind as 'return' | 'answer',
    answersId: r.answers_id === null ? null : Number(r.answers_id),
    text: r.text as string,
    authorId: (r.author_id as string | null) ?? null,
    authorName: (r.author_name as string | null) ?? null,
    createdAt: (r.created_at as Date).toISOString(),
  }));
}

export const sectionLabel = (ref: string | null, from: number, to: number) => `${ref ?? 'unplanned'} ${Math.round(from)}–${Math.round(to)} m`;

/** One package with its comments, or undefined. */
export async function getHandoverSummary(db: Db, id: string): Promise<HandoverSummary | undefined> {
  const r = (await base(db).where('h.id', id).first()) as Row | undefined;
  return r && toSummary(r, await listCommentsOf(db, [r.id]));
}

/** A project's packages, newest revision first, with their comments and answers. */
export async function listHandoverSummaries(db: Db, projectId: string): Promise<HandoverSummary[]> {
  const rows = (await base(db).where('h.project_id', projectId).orderBy('h.revision', 'desc')) as Row[];
  const comments = await listCommentsOf(db, rows.map((r) => r.id));
  return rows.map((r) => toSummary(r, comments.filter((c) => c.handoverId === r.id)));
}

/** The bare row, locked for the review (inside the transaction). */
export async function lockHandover(trx: Knex.Transaction, id: string): Promise<{ id: string; project_id: string; revision: number; status: HandoverStatus; snapshot: unknown } | undefined> {
  return trx('handovers').where({ id }).forUpdate().first('id', 'project_id', 'revision', 'status', 'snapshot');
}

export async function setReview(trx: Knex.Transaction, id: string, status: 'accepted' | 'returned', userId: string, comment: string): Promise<void> {
  await trx('handovers').where({ id }).update({ status, reviewed_by: userId, reviewed_at: trx.fn.now(), review_comment: comment });
}

export async function insertComments(trx: Knex.Transaction, rows: { handoverId: string; sectionId: string | null; kind: 'return' | 'answer'; answersId: number | null; text: string; authorId: string }[]): Promise<number[]> {
  if (rows.length === 0) return [];
  const ids = await trx('handover_comments')
    .insert(rows.map((r) => ({ handover_id: r.handoverId, section_id: r.sectionId, kind: r.kind, answers_id: r.answersId, text: r.text, author_id: r.authorId })))
    .returning('id');
  return ids.map((x: { id: string | number }) => Number(x.id));
}

/** Sections of the project among `ids` (current or retired), with their labels. */
export async function sectionsOfProject(db: Db, projectId: string, ids: string[]): Promise<Map<string, string>> {
  if (ids.length === 0) return new Map();
  const rows = await db('sections').where({ project_id: projectId }).whereIn('id', ids).select('id', 'planned_route_ref', 'from_chainage_m', 'to_chainage_m');
  return new Map(rows.map((r: { id: string; planned_route_ref: string | null; from_chainage_m: number; to_chainage_m: number }) => [r.id, sectionLabel(r.planned_route_ref, r.from_chainage_m, r.to_chainage_m)]));
}

/** People of an organisation with the given roles, active, for the e-mails. */
export async function recipientsOf(db: Db, organisationId: string, roles: string[]): Promise<{ email: string; name: string }[]> {
  return db('users').where({ organisation_id: organisationId, active: true }).whereIn('role', roles).orderBy('email').select('email', 'name');
}
