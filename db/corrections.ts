import type { Db } from './client';
import type { Correction } from '@/lib/matching/corrections';
import { DEFAULT_SIGMA_M } from '@/lib/records/accuracy-classes';

export type CorrectionKind = 'split' | 'merge' | 'reassign' | 'mark_built' | 'promote' | 'not_built_reason';

/** A stored correction: what the engineer asked for, on which stretch, and whether it still stands. */
export interface StoredCorrection {
  id: number;
  projectId: string;
  kind: CorrectionKind;
  plannedRouteRef: string | null;
  fromChainageM: number | null;
  toChainageM: number | null;
  targetRouteRef: string | null;
  sourceUploadId: string | null;
  sigmaM: number | null;
  laidOn: string | null;
  reason: string;
  sectionId: string | null;
  createdByName: string | null;
  createdAt: string;
  withdrawnAt: string | null;
}

export type NewCorrection = Omit<StoredCorrection, 'id' | 'projectId' | 'createdByName' | 'createdAt' | 'withdrawnAt'>;

const toDto = (r: Record<string, any>): StoredCorrection => ({
  id: Number(r.id), projectId: r.project_id, kind: r.kind, plannedRouteRef: r.planned_route_ref, fromChainageM: r.from_chainage_m, toChainageM: r.to_chainage_m,
  targetRouteRef: r.target_route_ref, sourceUploadId: r.source_upload_id, sigmaM: r.sigma_m, laidOn: r.laid_on, reason: r.reason, sectionId: r.section_id,
  createdByName: r.created_by_name ?? null, createdAt: new Date(r.created_at).toISOString(), withdrawnAt: r.withdrawn_at ? new Date(r.withdrawn_at).toISOString() : null,
});

const select = (db: Db) =>
  db('section_corrections as c').leftJoin('users as u', 'u.id', 'c.created_by').select('c.*', 'u.name as created_by_name', db.raw("to_char(c.laid_on, 'YYYY-MM-DD') as laid_on"));

export async function insertCorrection(db: Db, projectId: string, c: NewCorrection, userId: string): Promise<StoredCorrection> {
  const [{ id }] = await db('section_corrections')
    .insert({
      project_id: projectId, kind: c.kind, planned_route_ref: c.plannedRouteRef, from_chainage_m: c.fromChainageM, to_chainage_m: c.toChainageM, target_route_ref: c.targetRouteRef,
      source_upload_id: c.sourceUploadId, sigma_m: c.sigmaM, laid_on: c.laidOn, reason: c.reason, section_id: c.sectionId, created_by: userId,
    })
    .returning('id');
  return (await getCorrection(db, Number(id)))!;
}

export async function getCorrection(db: Db, id: number): Promise<StoredCorrection | undefined> {
  const row = await select(db).where('c.id', id).first();
  return row && toDto(row);
}

/** The project's corrections, newest first; `activeOnly` leaves out withdrawn ones. */
export async function listCorrections(db: Db, projectId: string, activeOnly = false): Promise<StoredCorrection[]> {
  const q = select(db).where('c.project_id', projectId).orderBy('c.id', 'desc');
  if (activeOnly) q.whereNull('c.withdrawn_at');
  return (await q).map(toDto);
}

export async function withdrawCorrection(db: Db, id: number, userId: string): Promise<void> {
  await db('section_corrections').where({ id }).update({ withdrawn_at: db.fn.now(), withdrawn_by: userId });
}

/** Active corrections as the reconciliation applies them (promotions change the plan and are not among them). */
export function toMatchingCorrections(list: StoredCorrection[]): Correction[] {
  const out: Correction[] = [];
  for (const c of list) {
    if (c.withdrawnAt || c.plannedRouteRef === null) continue;
    const ref = c.plannedRouteRef;
    const fromM = c.fromChainageM ?? 0;
    const toM = c.toChainageM ?? fromM;
    if (c.kind === 'split' || c.kind === 'merge') out.push({ id: c.id, kind: c.kind, ref, atM: fromM });
    else if (c.kind === 'reassign' && c.targetRouteRef) out.push({ id: c.id, kind: 'reassign', ref, fromM, toM, targetRef: c.targetRouteRef });
    else if (c.kind === 'mark_built') out.push({ id: c.id, kind: 'mark_built', ref, fromM, toM, sourceUploadId: c.sourceUploadId, sigmaM: c.sigmaM ?? DEFAULT_SIGMA_M.unknown, laidOn: c.laidOn, reason: c.reason });
    else if (c.kind === 'not_built_reason') out.push({ id: c.id, kind: 'not_built_reason', ref, fromM, toM, reason: c.reason });
  }
  return out;
}
