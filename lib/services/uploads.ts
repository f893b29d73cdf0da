import { randomUUID } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { buffer as readStream } from 'node:stream/consumers';
import type { Knex } from 'knex';
import { z } from 'zod';
import { writeAudit } from '@/db/audit';
import { getCrsDefinition } from '@/db/crs';
import type { Project } from '@/db/projects';
import {
  findUploadBySha,
  getUpload,
  insertUploadFeatures,
  insertUploadFiles,
  insertUploadOnce,
  listUploadFiles,
  setUploadStatus,
  updateUploadOutcome,
  type Upload,
  type UploadOutcome,
} from '@/db/uploads';
import { AppError, type ErrorCode } from '@/lib/api/errors';
import type { ReceivedForm } from '@/lib/api/multipart';
import { epsgField, jsonField } from '@/lib/api/form-fields';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { env } from '@/lib/env';
import { parseUpload } from '@/lib/ingest/parse-upload';
import { combinedSha, removeOriginals, storeOriginals } from './originals';
import { IngestError, type ColumnMap, type ParsedUpload } from '@/lib/ingest/types';
import { ACCURACY_CLASSES, DEFAULT_SIGMA_M, type AccuracyClass } from '@/lib/records/accuracy-classes';
import { plausibleDate } from '@/lib/records/plausible-ranges';
import { originalsStore } from '@/lib/storage/originals-store';

export const UPLOAD_CONTENTS = ['trench', 'road_crossings', 'test_pits', 'depth_shots', 'mixed'] as const;

const columnMapSchema = z
  .object({
    id: z.string(), x: z.string(), y: z.string(), z: z.string(), lat: z.string(), lon: z.string(), code: z.string(),
    line: z.string(), date: z.string(), fix: z.string(), rmsH: z.string(), rmsV: z.string(), depth: z.string(),
  })
  .partial()
  .strict();

const settingsShape = {
  crs: epsgField.optional(),
  accuracy: z.enum(ACCURACY_CLASSES).optional(),
  surveyDate: plausibleDate('the survey date').optional(),
  crew: z.string().trim().max(200).optional(),
  content: z.enum(UPLOAD_CONTENTS).optional(),
};

/** Settings sent with an upload as multipart fields (columns as a JSON string). */
export const uploadFieldsSchema = z.object({
  ...settingsShape,
  columns: jsonField(columnMapSchema, '{"id":"pt","x":"easting","y":"northing"}').optional(),
  supersedes: z.uuid('supersedes must be the id of an upload').optional(),
});

/** Settings sent to retry a failed upload (JSON body). */
export const retrySettingsSchema = z.object({ ...settingsShape, columns: columnMapSchema.optional() });

type Settings = z.infer<typeof retrySettingsSchema>;

// refused before anything is stored: the request leaves no trace
const REFUSED_UNSTORED = new Set(['empty_file', 'unknown_format', 'unsupported_format']);

export function sigmaFor(project: Project, cls: AccuracyClass): number {
  return project.accuracySigmas[cls] ?? DEFAULT_SIGMA_M[cls];
}

/** Parses files with the project's catalogue and limits; an IngestError is returned, not thrown. */
export async function parse(db: Knex, project: Project, files: { name: string; bytes: Buffer }[], s: { crs?: string; columns?: unknown }): Promise<ParsedUpload | IngestError> {
  const e = env();
  try {
    return await parseUpload(files, {
      crs: s.crs,
      columns: s.columns as ColumnMap | undefined,
      resolveCrs: (srid) => getCrsDefinition(db, srid),
      limits: { maxInflatedBytes: e.ZIP_MAX_INFLATED_BYTES, maxZipEntries: e.ZIP_MAX_ENTRIES },
      projectExtent: project.extent,
    });
  } catch (err) {
    if (err instanceof IngestError) return err;
    throw err;
  }
}

function outcomeOf(result: ParsedUpload | IngestError): UploadOutcome {
  if (result instanceof IngestError) {
    return { format: null, crs: null, status: 'failed', error: { code: result.code, message: result.message, details: result.details }, warnings: [], columns: null, featureCount: 0, pointCount: 0 };
  }
  const pointCount = result.features.reduce((n, f) => n + (f.kind === 'line' ? f.coords.length : 1), 0);
  return {
    format: result.format,
    crs: result.sourceCrs,
    status: 'stored',
    error: null,
    warnings: result.warnings,
    columns: result.columns ?? null,
    featureCount: result.features.length,
    pointCount,
  };
}

function failure(upload: Upload): AppError {
  const err = upload.error!;
  const details = err.details && typeof err.details === 'object' && !Array.isArray(err.details) ? { ...err.details, uploadId: upload.id } : { problems: err.details, uploadId: upload.id };
  return new AppError(err.code as ErrorCode, err.message, details);
}

/**
 * Takes a received multipart upload: refuses empty and unknown files without a trace, returns the existing
 * upload for bytes the project already has, else stores the originals, parses them and writes the upload
 * and its features in one transaction. A file that fails to parse keeps its record and original, and the
 * failure is thrown (with `details.uploadId`) after that record is committed.
 */
export async function receiveUpload(db: Knex, actor: Principal, project: Project, form: ReceivedForm): Promise<{ upload: Upload; created: boolean }> {
  const fields = uploadFieldsSchema.parse(form.fields);
  const parts = form.files.filter((f) => f.field === 'file' || f.field === 'files');
  if (parts.length === 0) throw new AppError('bad_request', 'Attach the file in a multipart part named "file".');

  const settings: Settings = fields;
  const sha256 = combinedSha(parts);
  const existing = await findUploadBySha(db, project.id, sha256);
  if (existing && existing.status !== 'failed') return { upload: existing, created: false };

  const files = await Promise.all(parts.map(async (p) => ({ name: p.fileName, bytes: await readFile(p.tmpPath) })));
  const result = await parse(db, project, files, settings);
  if (result instanceof IngestError && REFUSED_UNSTORED.has(result.code)) {
    throw new AppError(result.code as ErrorCode, result.message, result.details);
  }
  if (existing) return retryWith(db, actor, project, existing, settings, result);

  let superseded: Upload | undefined;
  if (fields.supersedes) {
    superseded = await getUpload(db, fields.supersedes);
    if (!superseded || superseded.projectId !== project.id) throw new AppError('invalid', 'supersedes: no such upload in this project.', [{ path: 'supersedes', message: 'No such upload in this project.' }]);
    if (superseded.status !== 'stored') throw new AppError('conflict', `The upload to supersede is ${superseded.status}; only a stored upload can be superseded.`);
  }

  const id = randomUUID();
  const accuracyClass = settings.accuracy ?? project.defaultAccuracyClass;
  const stored = await storeOriginals(`uploads/${project.id}/${id}`, parts, files.map((f) => f.bytes));
  try {
    const outcome = outcomeOf(result);
    const inserted = await db.transaction(async (trx) => {
      const won = await insertUploadOnce(
        trx,
        {
          id, projectId: project.id, sha256, sizeBytes: parts.reduce((n, p) => n + p.size, 0),
          fileName: parts.map((p) => p.fileName).join(', ').slice(0, 500), accuracyClass, sigmaM: sigmaFor(project, accuracyClass),
          surveyDate: settings.surveyDate ?? null, crew: settings.crew ?? '', content: settings.content ?? 'trench', uploadedBy: actor.id,
        },
        outcome,
      );
      if (!won) return false;
      await insertUploadFiles(trx, id, stored);
      if (!(result instanceof IngestError)) await insertUploadFeatures(trx, id, project.id, result.features);
      if (superseded) await setUploadStatus(trx, superseded.id, 'superseded', id);
      await writeAudit(trx, auditActor(actor), {
        projectId: project.id, objectType: 'upload', objectId: id, action: 'create',
        after: { fileName: parts.map((p) => p.fileName), sha256, status: outcome.status, format: outcome.format, crs: outcome.crs, featureCount: outcome.featureCount, pointCount: outcome.pointCount, error: outcome.error?.code ?? null, supersedes: superseded?.id ?? null },
      });
      return true;
    });
    if (!inserted) {
      await removeOriginals(stored);
      return { upload: (await findUploadBySha(db, project.id, sha256))!, created: false };
    }
  } catch (err) {
    await removeOriginals(stored);
    throw err;
  }
  const upload = (await getUpload(db, id))!;
  if (upload.status === 'failed') throw failure(upload);
  return { upload, created: true };
}

async function retryWith(db: Knex, actor: Principal, project: Project, upload: Upload, settings: Settings, result: ParsedUpload | IngestError) {
  const outcome = outcomeOf(result);
  const accuracyClass = settings.accuracy;
  await db.transaction(async (trx) => {
    await updateUploadOutcome(
      trx,
      upload.id,
      { accuracyClass, sigmaM: accuracyClass ? sigmaFor(project, accuracyClass) : undefined, surveyDate: settings.surveyDate, crew: settings.crew, content: settings.content },
      outcome,
    );
    if (!(result instanceof IngestError)) await insertUploadFeatures(trx, upload.id, project.id, result.features);
    await writeAudit(trx, auditActor(actor), {
      projectId: project.id, objectType: 'upload', objectId: upload.id, action: 'retry',
      before: { status: upload.status, error: upload.error?.code ?? null, crs: upload.crs },
      after: { status: outcome.status, error: outcome.error?.code ?? null, crs: outcome.crs, settings },
    });
  });
  const after = (await getUpload(db, upload.id))!;
  if (after.status === 'failed') throw failure(after);
  return { upload: after, created: false };
}

/** Parses a failed upload's stored originals again with new settings (say, the missing CRS). */
export async function retryUpload(db: Knex, actor: Principal, project: Project, uploadId: string, settings: Settings) {
  const upload = await getUpload(db, uploadId);
  if (!upload || upload.projectId !== project.id) throw new AppError('not_found', 'Upload not found.');
  if (upload.status !== 'failed') throw new AppError('conflict', `The upload is ${upload.status}; only a failed upload can be retried.`);
  const originals = await listUploadFiles(db, upload.id);
  const files = await Promise.all(originals.map(async (f) => ({ name: f.fileName, bytes: await readStream(originalsStore().get(f.storageKey)) })));
  const result = await parse(db, project, files, settings);
  return retryWith(db, actor, project, upload, settings, result);
}

/** Withdraws a stored upload: it stays, with its original, but is no longer used for the record. */
export async function withdrawUpload(db: Knex, actor: Principal, project: Project, uploadId: string, reason: string): Promise<Upload> {
  return db.transaction(async (trx) => {
    const upload = await getUpload(trx, uploadId);
    if (!upload || upload.projectId !== project.id) throw new AppError('not_found', 'Upload not found.');
    if (upload.status !== 'stored') throw new AppError('conflict', `The upload is ${upload.status}; only a stored upload can be withdrawn.`);
    await setUploadStatus(trx, uploadId, 'withdrawn');
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'upload', objectId: uploadId, action: 'withdraw', before: { status: 'stored' }, after: { status: 'withdrawn', reason } });
    return (await getUpload(trx, uploadId))!;
  });
}

export const uploadAccuracySchema = z.object({
  accuracy: z.enum(ACCURACY_CLASSES, { message: `Pick one of the accuracy classes: ${ACCURACY_CLASSES.join(', ')}.` }),
}).strict();

/**
 * Sets an upload's accuracy class afterwards (an RTK survey uploaded under the project's default, say): its σ
 * follows the class (the project's override, else the default), with an audit entry; the caller then has the
 * project reconciled again, so that the sections' 95 % radii follow. A withdrawn or superseded upload keeps
 * what it had.
 */
export async function setUploadAccuracy(db: Knex, actor: Principal, project: Project, uploadId: string, input: z.infer<typeof uploadAccuracySchema>): Promise<{ upload: Upload; changed: boolean }> {
  return db.transaction(async (trx) => {
    const upload = await getUpload(trx, uploadId);
    if (!upload || upload.projectId !== project.id) throw new AppError('not_found', 'Upload not found.');
    if (upload.status === 'withdrawn' || upload.status === 'superseded') {
      throw new AppError('conflict', `The upload is ${upload.status}: it no longer counts, so its accuracy is kept as it was.`);
    }
    const sigmaM = sigmaFor(project, input.accuracy);
    if (upload.accuracyClass === input.accuracy && upload.sigmaM === sigmaM) return { upload, changed: false };
    await trx('uploads').where({ id: uploadId }).update({ accuracy_class: input.accuracy, sigma_m: sigmaM, updated_at: trx.fn.now() });
    await writeAudit(trx, auditActor(actor), {
      projectId: project.id, objectType: 'upload', objectId: uploadId, action: 'accuracy',
      before: { accuracyClass: upload.accuracyClass, sigmaM: upload.sigmaM }, after: { accuracyClass: input.accuracy, sigmaM },
    });
    return { upload: (await getUpload(trx, uploadId))!, changed: true };
  });
}

/** The upload as the API answers it. */
export function publicUpload(u: Upload) {
  return {
    id: u.id, status: u.status, format: u.format, crs: u.crs, sha256: u.sha256, featureCount: u.featureCount, pointCount: u.pointCount,
    warnings: u.warnings, fileName: u.fileName, sizeBytes: u.sizeBytes, accuracyClass: u.accuracyClass, sigmaM: u.sigmaM,
    surveyDate: u.surveyDate, crew: u.crew, content: u.content, columns: u.columns, error: u.error, supersededBy: u.supersededBy,
    uploadedBy: u.uploadedByName, createdAt: u.createdAt,
  };
}

/** Parses without storing anything: the column mapping and CRS step of the uploads page uses it. */
export async function previewUpload(db: Knex, project: Project, form: ReceivedForm) {
  const fields = uploadFieldsSchema.parse(form.fields);
  const parts = form.files.filter((f) => f.field === 'file' || f.field === 'files');
  if (parts.length === 0) throw new AppError('bad_request', 'Attach the file in a multipart part named "file".');
  const files = await Promise.all(parts.map(async (p) => ({ name: p.fileName, bytes: await readFile(p.tmpPath) })));
  const result = await parse(db, project, files, fields);
  if (result instanceof IngestError) throw new AppError(result.code as ErrorCode, result.message, result.details);
  const o = outcomeOf(result);
  return { format: o.format, crs: o.crs, featureCount: o.featureCount, pointCount: o.pointCount, warnings: o.warnings, columns: result.columns ?? null };
}
