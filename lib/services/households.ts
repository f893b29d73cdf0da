import type { Knex } from 'knex';

export interface HouseholdFigures {
  addresses: number;
  households: number;
  householdsServed: number;
  addressesPassed: number;
  householdsPassed: number;
  householdsPassedApproved: number;
  addressesConnected: number;
  householdsConnected: number;
}

/**
 * Derives every address's serving route, side, foot point and passed flag from the current plan, the built
 * sections and the road crossings, in one transaction, and upserts the day's progress row.
 * (Being built in issue 15: the helper replaces this body.)
 */
export async function recomputeHouseholds(db: Knex, projectId: string, progress: (f: number, m: string) => Promise<void>): Promise<HouseholdFigures> {
  void db; void projectId; void progress;
  throw new Error('recomputeHouseholds is being built');
}

/** Queues a households recompute unless one is already waiting: changes in quick succession share one run. */
export async function requestHouseholds(db: Knex, projectId: string, requestedBy: string | null) {
  // loaded here, not at the top: the job kinds import this module, and the queue imports the kinds
  const { enqueueJob } = await import('@/lib/jobs/queue');
  const { getJob } = await import('@/db/jobs');
  const waiting = await db('jobs').where({ project_id: projectId, kind: 'households', status: 'queued' }).orderBy('created_at').first('id');
  if (waiting) return (await getJob(db, waiting.id))!;
  return enqueueJob(db, { projectId, kind: 'households', input: { requestedBy }, createdBy: requestedBy });
}
