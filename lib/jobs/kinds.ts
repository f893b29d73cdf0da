import type { Knex } from 'knex';
import type { Action } from '@/lib/auth/roles';
import { exportAuditLog } from './audit-export';
import { handoverJob } from '@/lib/services/handovers';
import { householdsJob } from './households-job';
import { reconcileJob } from './reconcile-job';

export interface JobContext {
  db: Knex;
  jobId: string;
  projectId: string;
  input: Record<string, unknown>;
  /** reports progress 0..1 with a short message a person can read */
  progress(fraction: number, message: string): Promise<void>;
}

export type JobHandler = (ctx: JobContext) => Promise<{ message: string; result: Record<string, unknown> }>;

export interface JobKindSpec {
  run: JobHandler;
  /** the action a role needs to start the job and download its result */
  action: Action;
}

/** Every kind of background job; a pg-boss queue of the same name exists for each. */
export const JOB_KINDS = {
  'audit-export': { run: exportAuditLog, action: 'audit.export' },
  reconcile: { run: reconcileJob, action: 'reconcile.run' },
  households: { run: householdsJob, action: 'address.read' },
  handover: { run: handoverJob, action: 'handover.build' },
} satisfies Record<string, JobKindSpec>;

export type JobKind = keyof typeof JOB_KINDS;
