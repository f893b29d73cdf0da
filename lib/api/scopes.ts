import { getAddressImport } from '@/db/address-imports';
import { getCorrection } from '@/db/corrections';
import type { Db } from '@/db/client';
import { getJob } from '@/db/jobs';
import { getOrgChange } from '@/db/org-changes';
import { getUserRow } from '@/db/users';
import { getApiToken } from '@/db/api-tokens';
import { getUpload } from '@/db/uploads';
import { getSection } from '@/db/sections';
import { isUuid, type Scope } from './with-route';

/** A job belongs to its project. */
export async function byJobParam(params: Record<string, string>, db: Db): Promise<Scope | undefined> {
  if (!isUuid(params.jobId)) return undefined;
  const job = await getJob(db, params.jobId);
  return job && { projectId: job.projectId };
}

/** A user belongs to their organisation. */
export async function byUserParam(params: Record<string, string>, db: Db): Promise<Scope | undefined> {
  if (!isUuid(params.userId)) return undefined;
  const user = await getUserRow(db, params.userId);
  return user && { organisationId: user.organisation_id };
}

/** A token belongs to its user's organisation (the service then insists on its own user). */
export async function byTokenParam(params: Record<string, string>, db: Db): Promise<Scope | undefined> {
  if (!isUuid(params.tokenId)) return undefined;
  const token = await getApiToken(db, params.tokenId);
  if (!token) return undefined;
  const user = await getUserRow(db, token.userId);
  return user && { organisationId: user.organisation_id };
}

/** An upload belongs to its project; the route's projectId must match it. */
export async function byUploadParam(params: Record<string, string>, db: Db): Promise<Scope | undefined> {
  if (!isUuid(params.uploadId) || !isUuid(params.projectId)) return undefined;
  const upload = await getUpload(db, params.uploadId);
  return upload && upload.projectId === params.projectId ? { projectId: upload.projectId } : undefined;
}

/** A section belongs to its project. */
export async function bySectionParam(params: Record<string, string>, db: Db): Promise<Scope | undefined> {
  if (!isUuid(params.sectionId)) return undefined;
  const section = await getSection(db, params.sectionId);
  return section && { projectId: section.projectId };
}

export async function byCorrectionParam(params: Record<string, string>, db: Db): Promise<Scope | undefined> {
  if (!/^\d{1,15}$/.test(params.correctionId ?? '')) return undefined;
  const c = await getCorrection(db, Number(params.correctionId));
  return c && { projectId: c.projectId };
}

/** A proposed change of owner or contractor belongs to its project; the route's projectId must match it. */
export async function byOrgChangeParam(params: Record<string, string>, db: Db): Promise<Scope | undefined> {
  if (!/^\d{1,15}$/.test(params.changeId ?? '') || !isUuid(params.projectId)) return undefined;
  const c = await getOrgChange(db, Number(params.changeId));
  return c && c.projectId === params.projectId ? { projectId: c.projectId } : undefined;
}

/**
 * A trench record (a row of `table` with id and project_id, named by the route's `param`) belongs to its
 * project; the route's projectId must match it. `byProjectRecord('duct_bundles', 'bundleId')`.
 */
export function byProjectRecord(table: string, param: string) {
  return async (params: Record<string, string>, db: Db): Promise<Scope | undefined> => {
    if (!isUuid(params[param]) || !isUuid(params.projectId)) return undefined;
    const row = await db(table).where({ id: params[param] }).first('project_id');
    return row && row.project_id === params.projectId ? { projectId: row.project_id } : undefined;
  };
}

/** An address import belongs to its project. */
export async function byAddressImportParam(params: Record<string, string>, db: Db): Promise<Scope | undefined> {
  if (!isUuid(params.importId)) return undefined;
  const imp = await getAddressImport(db, params.importId);
  return imp && { projectId: imp.projectId };
}

/** A handover package belongs to its project (routes under /api/handovers/[handoverId]). */
export async function byHandoverParam(params: Record<string, string>, db: Db): Promise<Scope | undefined> {
  if (!isUuid(params.handoverId)) return undefined;
  const row = await db('handovers').where({ id: params.handoverId }).first('project_id');
  return row && { projectId: row.project_id };
}
