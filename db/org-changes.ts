import type { Db } from './client';
import type { ProjectOrgChangeRow } from './tables';
import type { OrgKind } from '@/lib/auth/roles';

export type OrgChangeStatus = ProjectOrgChangeRow['status'];

/** A proposed change of a project's network owner or contractor, and how it was answered. */
export interface OrgChange {
  id: number;
  projectId: string;
  side: OrgKind;
  fromOrgId: string;
  fromOrgName: string;
  toOrgId: string;
  toOrgName: string;
  reason: string;
  proposedByName: string | null;
  proposedByOrgId: string;
  proposedByOrgName: string;
  proposedAt: string;
  status: OrgChangeStatus;
  answeredByName: string | null;
  answeredAt: string | null;
  answerNote: string | null;
}

type JoinedRow = ProjectOrgChangeRow & {
  from_org_name: string;
  to_org_name: string;
  proposed_by_name: string | null;
  proposed_by_org_name: string;
  answered_by_name: string | null;
};

const toDto = (r: JoinedRow): OrgChange => ({
  id: Number(r.id),
  projectId: r.project_id,
  side: r.side,
  fromOrgId: r.from_org_id,
  fromOrgName: r.from_org_name,
  toOrgId: r.to_org_id,
  toOrgName: r.to_org_name,
  reason: r.reason,
  proposedByName: r.proposed_by_name,
  proposedByOrgId: r.proposed_by_org_id,
  proposedByOrgName: r.proposed_by_org_name,
  proposedAt: r.proposed_at.toISOString(),
  status: r.status,
  answeredByName: r.answered_by_name,
  answeredAt: r.answered_at ? r.answered_at.toISOString() : null,
  answerNote: r.answer_note,
});

function baseQuery(db: Db) {
  return db('project_org_changes as c')
    .join('organisations as f', 'f.id', 'c.from_org_id')
    .join('organisations as t', 't.id', 'c.to_org_id')
    .join('organisations as po', 'po.id', 'c.proposed_by_org_id')
    .leftJoin('users as pu', 'pu.id', 'c.proposed_by')
    .leftJoin('users as au', 'au.id', 'c.answered_by')
    .select(
      'c.*',
      'f.name as from_org_name',
      't.name as to_org_name',
      'po.name as proposed_by_org_name',
      'pu.name as proposed_by_name',
      'au.name as answered_by_name',
    );
}

export async function getOrgChange(db: Db, id: number): Promise<OrgChange | undefined> {
  const row = await baseQuery(db).where('c.id', id).first();
  return row && toDto(row as JoinedRow);
}

/** A project's proposals, newest first; `pendingOnly` for the one that is open, if any. */
export async function listOrgChanges(db: Db, projectId: string, pendingOnly = false): Promise<OrgChange[]> {
  const q = baseQuery(db).where('c.project_id', projectId).orderBy('c.proposed_at', 'desc').orderBy('c.id', 'desc');
  if (pendingOnly) q.where('c.status', 'pending');
  return ((await q) as JoinedRow[]).map(toDto);
}

export interface NewOrgChange {
  projectId: string;
  side: OrgKind;
  fromOrgId: string;
  toOrgId: string;
  reason: string;
  proposedBy: string;
  proposedByOrgId: string;
}

export async function insertOrgChange(db: Db, c: NewOrgChange): Promise<number> {
  const [{ id }] = await db('project_org_changes')
    .insert({
      project_id: c.projectId, side: c.side, from_org_id: c.fromOrgId, to_org_id: c.toOrgId, reason: c.reason,
      proposed_by: c.proposedBy, proposed_by_org_id: c.proposedByOrgId,
    })
    .returning('id');
  return Number(id);
}

/** Closes a pending proposal; false when it was no longer pending (someone answered first). */
export async function answerOrgChange(db: Db, id: number, status: Exclude<OrgChangeStatus, 'pending'>, userId: string, note: string | null): Promise<boolean> {
  const n = await db('project_org_changes')
    .where({ id, status: 'pending' })
    .update({ status, answered_by: userId, answered_at: db.fn.now(), answer_note: note });
  return n === 1;
}
