import type { Db } from './client';
import type { Snapshot } from '@/lib/handover/change-report';

// The build side of handover packages (issue 16, helper E1): new revisions, their build state, the stored
// file. The review side is db/handover-reviews.ts.

export interface HandoverRow {
  id: string; project_id: string; revision: number; status: 'building' | 'issued' | 'failed' | 'accepted' | 'returned'; scope: Record<string, unknown>; note: string;
  job_id: string | null; failure_reason: string | null; file_name: string | null; storage_key: string | null; size_bytes: string | number | null; sha256: string | null;
  manifest: unknown; change_report: unknown; snapshot: Snapshot | null; generator_version: string | null; created_by: string | null; created_at: Date; issued_at: Date | null;
}

export async function getHandoverRow(db: Db, id: string): Promise<HandoverRow | undefined> {
  return db('handovers').where({ id }).first();
}

/** The next revision number of a project, under a lock held until the transaction ends. */
export async function nextRevision(trx: Db, projectId: string): Promise<number> {
  await trx.raw('SELECT pg_advisory_xact_lock(hashtext(?))', [`handover-revision:${projectId}`]);
  const { max } = (await trx('handovers').where({ project_id: projectId }).max('revision as max').first()) as { max: number | null };
  return (max ?? 0) + 1;
}

/** The newest issued (or reviewed) revision before `revision`, with its snapshot, for the change report. */
export async function previousIssued(db: Db, projectId: string, revision: number): Promise<{ revision: number; snapshot: Snapshot } | null> {
  const r = await db('handovers').where({ project_id: projectId }).whereIn('status', ['issued', 'accepted', 'returned']).where('revision', '<', revision)
    .whereNotNull('snapshot').orderBy('revision', 'desc').first('revision', 'snapshot');
  if (!r) return null;
  const snap = r.snapshot as Partial<Snapshot>;
  return { revision: r.revision, snapshot: { sections: Array.isArray(snap.sections) ? (snap.sections as Snapshot['sections']).filter((s) => typeof s === 'object' && s && 'geom' in s) : [], passed: snap.passed ?? [] } };
}
