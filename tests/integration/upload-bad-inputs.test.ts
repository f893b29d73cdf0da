import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getProject, type Project } from '@/db/projects';
import { AppError } from '@/lib/api/errors';
import type { Principal } from '@/lib/auth/principal';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { receiveUpload } from '@/lib/services/uploads';
import { BAD, loadFixture } from '../fixtures/ingest/bad-inputs';
import { count, countFiles, makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf } from '../helpers/upload-form';

// the limits the fixtures were made against (zip-big-honest inflates past 1 MB; zip-many-entries has 1001)
process.env.ZIP_MAX_INFLATED_BYTES = String(1024 * 1024);
process.env.ZIP_MAX_ENTRIES = '1000';
process.env.STORAGE_DIR = path.resolve(__dirname, '../../.data/test-storage-bad');

const db = getDb();
let surveyor: Principal;
let project: Project;

const snapshot = async () => ({ uploads: await count(db, 'uploads'), files: await count(db, 'upload_files'), features: await count(db, 'upload_features'), stored: await countFiles(process.env.STORAGE_DIR!) });

// refused before anything is kept: the request leaves no trace
const UNSTORED = new Set(['empty_file', 'unknown_format', 'unsupported_format']);

beforeAll(async () => {
  const admin = await makePrincipal(db, 'admin', 'owner');
  surveyor = await makePrincipal(db, 'surveyor', 'owner', admin.organisationName);
  project = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: 'Bad inputs', partnerOrganisation: await registerPartner(db, admin, `Bad contractor ${Date.now()}`) }))).id))!;
});
afterAll(() => closeDb());

describe('every bad input through the upload pipeline', () => {
  it.each(BAD)('%s → %s', async (name, code, message, opts) => {
    const files = loadFixture(name);
    const fields: Record<string, string> = (opts as { crs?: string } | undefined)?.crs ? { crs: (opts as { crs: string }).crs } : {};
    const form = await formOf(files, fields);
    const before = await snapshot();
    const err = await receiveUpload(db, surveyor, project, form).then(() => null, (e: unknown) => e).finally(() => form.cleanup());
    expect(err).toBeInstanceOf(AppError);
    expect((err as AppError).code).toBe(code);
    expect((err as AppError).message).toMatch(message);
    const after = await snapshot();
    if (UNSTORED.has(code)) {
      expect(after).toEqual(before);
    } else {
      // the record and the original are kept, nothing half-parsed is
      const id = ((err as AppError).details as { uploadId: string }).uploadId;
      expect(after).toEqual({ uploads: before.uploads + 1, files: before.files + files.length, features: before.features, stored: before.stored + files.length });
      expect(await db('uploads').where({ id }).first('status', 'error_code')).toEqual({ status: 'failed', error_code: code });
    }
  });
});
