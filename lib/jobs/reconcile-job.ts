import { getUserRow } from '@/db/users';
import { requestHouseholds } from '@/lib/services/households';
import { runReconciliation } from '@/lib/services/reconcile';
import type { JobHandler } from './kinds';

/** The reconciliation as a background job, with progress; who asked for it is named in the audit log. */
export const reconcileJob: JobHandler = async ({ db, jobId, projectId, input, progress }) => {
  const by = typeof input.requestedBy === 'string' ? await getUserRow(db, input.requestedBy) : undefined;
  const actor = { userId: by?.id ?? null, label: by ? `reconciliation for ${by.name} <${by.email}>` : 'reconciliation after an upload', organisationId: by?.organisation_id ?? null };
  const out = await runReconciliation(db, projectId, jobId, actor, progress);
  // the built record changed (an upload, a correction, a promotion): households passed follow
  await requestHouseholds(db, projectId, by?.id ?? null);
  return { message: `Run ${out.run}: ${out.sections} sections (${out.created} new, ${out.retired} retired), ${out.matched} of ${out.fixes} fixes matched`, result: out };
};
