import { rm } from 'node:fs/promises';
import { createReadStream } from 'node:fs';
import type { Knex } from 'knex';
import { z } from 'zod';
import { writeAudit } from '@/db/audit';
import { getHandoverRow, nextRevision, previousIssued, type HandoverRow } from '@/db/handovers';
import { getJob, publicJob } from '@/db/jobs';
import { getProject, type Project } from '@/db/projects';
import { getUserRow } from '@/db/users';
import { AppError } from '@/lib/api/errors';
import { can } from '@/lib/auth/roles';
import { auditActor, type Principal } from '@/lib/auth/principal';
import type { JobHandler } from '@/lib/jobs/kinds';
import { originalsStore } from '@/lib/storage/originals-store';
import { buildPackage, GENERATOR_VERSION, NothingToPackage, scopedSections, type HandoverScope } from './handover-build';
import { queueIssuedMail } from './handover-reviews';

// Handover packages (issue 16, helper E1): createHandover queues the build; the `handover` job builds the
// package to a temporary file and stores it in one transaction with its manifest, change report and snapshot;
// handoverStatus is what GET /api/handovers/{id} shows; downloadable() gives the stored file of an issued
// package. Exports for helper E2: createHandover, createHandoverSchema, handoverStatus, downloadable, handoverJob.

export const createHandoverSchema = z.object({
  scope: z.object({
    routes: z.array(z.string().min(1).max(100)).max(1000).optional(),
    bbox: z.tuple([z.number().min(-180).max(180), z.number().min(-90).max(90), z.number().min(-180).max(180), z.number().min(-90).max(90)])
      .refine((b) => b[0] < b[2] && b[1] < b[3], 'bbox is [west, south, east, north] with west < east and south < north').optional(),
    projectCrs: z.boolean().optional(),
  }).strict().default({}),
  note: z.string().max(2000).default(''),
}).strict();
export type CreateHandoverInput = z.infer<typeof createHandoverSchema>;

export async function createHandover(db: Knex, actor: Principal, project: Project, input: CreateHandoverInput) {
  if (!can(actor.role, 'handover.build')) throw new AppError('forbidden', `Your role (${actor.role}) may not do this.`);
  const scope = input.scope as HandoverScope;
  if ((await scopedSections(db, project.id, scope)).length === 0) {
    throw new AppError('nothing_to_package', 'Nothing to package: no current, approved section lies in the chosen scope. Approve sections in the review first, or widen the routes or area.', [{ path: 'scope', message: 'no approved section in scope' }]);
  }
  const { enqueueJob } = await import('@/lib/jobs/queue');
  const h = await db.transaction(async (trx) => {
    const revision = await nextRevision(trx, project.id);
    const [row] = await trx('handovers').insert({ project_id: project.id, revision, status: 'building', scope: JSON.stringify(scope), note: input.note, created_by: actor.id, generator_version: GENERATOR_VERSION })
      .returning(['id', 'revision', 'status']);
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'handover', objectId: row.id, action: 'build', before: null, after: { revision, scope, note: input.note } });
    return row as { id: string; revision: number; status: string };
  });
  try {
    const job = await enqueueJob(db, { projectId: project.id, kind: 'handover', input: { handoverId: h.id }, createdBy: actor.id });
    await db('handovers').where({ id: h.id }).update({ job_id: job.id });
    return { handover: h, job: publicJob(job) };
  } catch (err) {
    await failHandover(db, h.id, `The build could not be queued: ${(err as Error).message}`);
    throw err;
  }
}

/** Marks a building package failed with its reason (no file is kept); a no-op for any other status. */
export async function failHandover(db: Knex, id: string, reason: string): Promise<void> {
  await db.transaction(async (trx) => {
    const h = await trx('handovers').where({ id, status: 'building' }).forUpdate().first('id', 'project_id', 'revision');
    if (!h) return;
    await trx('handovers').where({ id }).update({ status: 'failed', failure_reason: reason.slice(0, 2000) });
    await writeAudit(trx, { userId: null, label: 'handover build', organisationId: null }, { projectId: h.project_id, objectType: 'handover', objectId: id, action: 'fail', before: { status: 'building' }, after: { revision: h.revision, status: 'failed', reason } });
  });
}

/** Fails every package still building whose job is over (failed by the sweep or finished without it). */
export async function settleHandovers(db: Knex): Promise<number> {
  const rows = await db('handovers as h').join('jobs as j', 'j.id', 'h.job_id').where('h.status', 'building').whereIn('j.status', ['failed', 'completed']).select('h.id', 'j.message');
  for (const r of rows) await failHandover(db, r.id, `The build stopped: ${r.message ?? 'its job ended without finishing'}`);
  return rows.length;
}

export const handoverJob: JobHandler = async ({ db, input, progress }) => {
  const h = await getHandoverRow(db, String(input.handoverId));
  if (!h || h.status !== 'building') throw new Error('The package is not waiting to be built.');
  const project = (await getProject(db, h.project_id))!;
  const by = h.created_by ? await getUserRow(db, h.created_by) : undefined;
  let built: Awaited<ReturnType<typeof buildPackage>> | undefined;
  const key = `handovers/${h.project_id}/${h.id}/handover-r${h.revision}.zip`;
  try {
    await progress(0.02, 'Reading the records');
    const previous = await previousIssued(db, h.project_id, h.revision);
    built = await buildPackage(db, { project, revision: h.revision, createdAt: h.created_at, createdByName: by ? `${by.name} <${by.email}>` : 'unknown', scope: h.scope as HandoverScope, note: h.note, previous }, progress);
    await originalsStore().put(key, createReadStream(built.zipPath));
    const fileName = `${project.name.replace(/[^A-Za-z0-9._-]+/g, '-')}-handover-r${h.revision}.zip`;
    const out = built;
    await db.transaction(async (trx) => {
      const cur = await trx('handovers').where({ id: h.id }).forUpdate().first('status');
      if (cur?.status !== 'building') throw new Error('The package stopped building before it was stored.');
      await trx('handovers').where({ id: h.id }).update({
        status: 'issued', file_name: fileName, storage_key: key, size_bytes: out.sizeBytes, sha256: out.sha256, manifest: JSON.stringify(out.manifest),
        change_report: JSON.stringify(out.changeReport), snapshot: JSON.stringify(out.snapshot), generator_version: GENERATOR_VERSION, issued_at: trx.fn.now(),
      });
      await writeAudit(trx, { userId: by?.id ?? null, label: by ? `handover build for ${by.name} <${by.email}>` : 'handover build', organisationId: by?.organisation_id ?? null }, {
        projectId: h.project_id, objectType: 'handover', objectId: h.id, action: 'issue', before: { status: 'building' },
        after: { revision: h.revision, status: 'issued', sha256: out.sha256, sizeBytes: out.sizeBytes, changes: { added: out.changeReport.sectionsAdded.length, removed: out.changeReport.sectionsRemoved.length, changed: out.changeReport.sectionsChanged.length } },
      });
      await queueIssuedMail(trx, project, { revision: h.revision, fileName, sizeBytes: out.sizeBytes, note: h.note });
    });
    const c = out.changeReport;
    return { message: `Revision ${h.revision} issued: ${out.snapshot.sections.length} sections (${c.sectionsAdded.length} added, ${c.sectionsRemoved.length} removed, ${c.sectionsChanged.length} changed)`, result: { handoverId: h.id, revision: h.revision, sha256: out.sha256, sizeBytes: out.sizeBytes } };
  } catch (err) {
    await originalsStore().remove(key).catch(() => undefined);
    const reason = err instanceof NothingToPackage ? err.message : `The build failed: ${(err as Error).message}`;
    await failHandover(db, h.id, reason);
    throw new Error(reason);
  } finally {
    if (built) await rm(built.tmpDir, { recursive: true, force: true });
  }
};

export async function handoverStatus(db: Knex, id: string) {
  const h = (await getHandoverRow(db, id))!;
  const job = h.job_id ? await getJob(db, h.job_id) : undefined;
  return {
    handover: {
      id: h.id, projectId: h.project_id, revision: h.revision, status: h.status, scope: h.scope, note: h.note, failureReason: h.failure_reason,
      fileName: h.file_name, sizeBytes: h.size_bytes === null ? null : Number(h.size_bytes), sha256: h.sha256, generatorVersion: h.generator_version,
      createdAt: h.created_at.toISOString(), issuedAt: h.issued_at?.toISOString() ?? null,
      progress: h.status === 'building' ? (job?.progress ?? 0) : 1, progressMessage: job?.message ?? null,
      manifest: h.manifest, changeReport: h.change_report,
    },
    job: job ? publicJob(job) : null,
  };
}

/** The stored file of a package that may be downloaded (issued, accepted or returned), else a 409. */
export async function downloadable(db: Knex, id: string): Promise<HandoverRow & { storage_key: string }> {
  const h = (await getHandoverRow(db, id))!;
  if (!['issued', 'accepted', 'returned'].includes(h.status) || !h.storage_key) {
    throw new AppError('conflict', h.status === 'failed' ? `Revision ${h.revision} failed and has no file: ${h.failure_reason}` : `Revision ${h.revision} is still being built; download it once it is issued.`);
  }
  return h as HandoverRow & { storage_key: string };
}

export { getProject };
