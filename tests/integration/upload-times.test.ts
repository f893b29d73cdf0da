import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getProject, type Project } from '@/db/projects';
import { AppError } from '@/lib/api/errors';
import { errorResponse } from '@/lib/api/with-route';
import type { Principal } from '@/lib/auth/principal';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { receiveUpload } from '@/lib/services/uploads';
import { count, countFiles, makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf } from '../helpers/upload-form';

process.env.STORAGE_DIR = path.resolve(__dirname, '../../.data/test-storage-times');

const db = getDb();
let surveyor: Principal;
let project: Project;

const snapshot = async () => ({ uploads: await count(db, 'uploads'), files: await count(db, 'upload_files'), features: await count(db, 'upload_features'), stored: await countFiles(process.env.STORAGE_DIR!) });

/** A three-point GPX track whose second point has the time `t`. */
const track = (t: string, stamp: number) => `<?xml version="1.0" encoding="UTF-8"?>
<gpx version="1.1" creator="test" xmlns="http://www.topografix.com/GPX/1/1"><trk><name>Leap ${stamp}</name><trkseg>
<trkpt lat="52.517" lon="13.3888"><time>2024-02-28T07:30:00Z</time></trkpt>
<trkpt lat="52.51705" lon="13.38895"><time>${t}</time></trkpt>
<trkpt lat="52.5171" lon="13.3891"><time>2024-03-01T07:30:10Z</time></trkpt>
</trkseg></trk></gpx>
`;

beforeAll(async () => {
  const admin = await makePrincipal(db, 'admin', 'owner');
  surveyor = await makePrincipal(db, 'surveyor', 'owner', admin.organisationName);
  project = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: 'Leap days', partnerOrganisation: await registerPartner(db, admin, `Leap contractor ${Date.now()}`) }))).id))!;
});
afterAll(() => closeDb());

describe('an upload with a time the calendar does not have', () => {
  it('is refused with 422 naming the value, its failed record and original kept, no feature stored (it was a 500 from the database)', async () => {
    const form = await formOf([{ name: 'leap.gpx', bytes: track('2024-02-31T07:30:05Z', Date.now()) }]);
    const before = await snapshot();
    const err = await receiveUpload(db, surveyor, project, form).then(() => null, (e: unknown) => e).finally(() => form.cleanup());
    expect(err).toBeInstanceOf(AppError);
    // what the route answers: the wrapper's one error shape, with the status of the code table
    const res = errorResponse(err);
    expect(res.status).toBe(422);
    const body = (await res.json()) as { error: { code: string; message: string } };
    expect(body.error.code).toBe('malformed');
    expect(body.error.message).toMatch(/^1 time names a day or time that does not exist: <time> at line 4, column \d+: '2024-02-31T07:30:05Z' \(February 2024 has 29 days\)$/);
    // as for every malformed file: the record (failed) and the original are kept, nothing parsed is
    const after = await snapshot();
    expect(after).toEqual({ uploads: before.uploads + 1, files: before.files + 1, features: before.features, stored: before.stored + 1 });
    const id = ((err as AppError).details as { uploadId: string }).uploadId;
    expect(await db('uploads').where({ id }).first('status', 'error_code')).toEqual({ status: 'failed', error_code: 'malformed' });
  });

  it('a leap day that exists is stored with its times in UTC', async () => {
    const form = await formOf([{ name: 'leap-ok.gpx', bytes: track('2024-02-29T07:30:05Z', Date.now()) }]);
    const before = await snapshot();
    const r = await receiveUpload(db, surveyor, project, form).finally(() => form.cleanup());
    expect(r.upload.status).toBe('stored');
    const after = await snapshot();
    expect(after.features).toBe(before.features + 1);
    // PostgreSQL's own calendar reads the stored times back [PostgreSQL timestamptz]
    const rows = await db.raw<{ rows: { t: string }[] }>(
      `SELECT to_char(t AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS') AS t FROM upload_features f, unnest(f.times) AS t WHERE f.upload_id = ?`,
      [r.upload.id],
    );
    expect(rows.rows.map((x) => x.t)).toEqual(['2024-02-28T07:30:00', '2024-02-29T07:30:05', '2024-03-01T07:30:10']);
  });
});
