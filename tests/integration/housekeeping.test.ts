import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { mkdir, readdir, stat, utimes, writeFile } from 'node:fs/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getJob, insertJob } from '@/db/jobs';
import { getProject, type Project } from '@/db/projects';
import { listUploadFiles } from '@/db/uploads';
import { getBoss, stopBoss } from '@/lib/jobs/boss';
import { settleJobs } from '@/lib/jobs/settle';
import type { Principal } from '@/lib/auth/principal';
import { sweepOrphanFiles } from '@/lib/services/orphans';
import { createProject, createProjectSchema } from '@/lib/services/projects';
import { receiveUpload } from '@/lib/services/uploads';
import { LocalStore } from '@/lib/storage';
import { countFiles, makePrincipal, registerPartner } from '../helpers/fixtures';
import { formOf, gpxTrack } from '../helpers/upload-form';

const root = path.resolve(__dirname, `../../.data/test-housekeeping-${randomUUID().slice(0, 8)}`);
process.env.STORAGE_DIR = path.join(root, 'storage');
const db = getDb();
let admin: Principal;
let project: Project;

beforeAll(async () => {
  admin = await makePrincipal(db, 'admin', 'contractor');
  const partner = await registerPartner(db, admin, `Sweep owner ${Date.now()}`);
  project = (await getProject(db, (await createProject(db, admin, createProjectSchema.parse({ name: 'Housekeeping', partnerOrganisation: partner }))).id))!;
});
afterAll(async () => {
  await stopBoss();
  await closeDb();
});

async function queueCopy(kind: string, id: string) {
  return (await (await getBoss()).getJobById(kind, id, { includeArchive: true }))!;
}

describe('settling job rows with the queue', () => {
  it('fails a running job whose heartbeat stopped, and its queue copy with it; leaves a live one and a waiting one', async () => {
    const boss = await getBoss();
    const kind = 'audit-export';
    await boss.createQueue(kind);
    const make = async (status: 'queued' | 'running', beatSecondsAgo: number | null) => {
      const job = await insertJob(db, { projectId: project.id, kind, input: {}, createdBy: admin.id });
      const queueJobId = (await boss.send(kind, { jobId: job.id }, { retryLimit: 0 }))!;
      await db('jobs').where({ id: job.id }).update({
        status,
        queue_job_id: queueJobId,
        started_at: status === 'running' ? db.raw("now() - interval '10 minutes'") : null,
        heartbeat_at: beatSecondsAgo === null ? null : db.raw(`now() - interval '${beatSecondsAgo} seconds'`),
      });
      return { id: job.id, queueJobId };
    };
    const dead = await make('running', 300);
    const alive = await make('running', 2);
    const waiting = await make('queued', null);
    // the two running ones were taken from the queue by a worker
    const fetched = await boss.fetch(kind, { batchSize: 10 });
    expect(fetched.map((f) => f.id).sort()).toEqual([dead.queueJobId, alive.queueJobId, waiting.queueJobId].sort());
    // …but the waiting one goes back to waiting in the queue: simulate it not yet taken
    await db.raw('update pgboss.job set state = ?, started_on = null where id = ?', ['created', waiting.queueJobId]);

    const settled = await settleJobs(db, boss, 10);
    expect(settled.map((s) => s.jobId)).toEqual([dead.id]);
    const failed = (await getJob(db, dead.id))!;
    expect(failed.status).toBe('failed');
    expect(failed.message).toMatch(/worker or the database went away/);
    expect(failed.finishedAt).not.toBeNull();
    expect((await queueCopy(kind, dead.queueJobId)).state).toBe('failed');
    expect((await getJob(db, alive.id))!.status).toBe('running');
    expect((await getJob(db, waiting.id))!.status).toBe('queued');

    // the queue later fails its own copy of the waiting job (say, expired): the row follows
    await db.raw('update pgboss.job set state = ? where id = ?', ['failed', waiting.queueJobId]);
    const again = await settleJobs(db, boss, 10);
    expect(again.map((s) => s.jobId)).toEqual([waiting.id]);
    expect((await getJob(db, waiting.id))!.message).toMatch(/Never started/);
    // nothing is left unfinished that cannot finish; a second pass changes nothing
    expect(await settleJobs(db, boss, 10)).toEqual([]);
  });
});

describe('sweeping orphan files', () => {
  const old = new Date(Date.now() - 2 * 3600 * 1000);
  const plant = async (file: string, age: Date | null) => {
    await mkdir(path.dirname(file), { recursive: true });
    await writeFile(file, 'orphan bytes');
    if (age) {
      await utimes(file, age, age);
      await utimes(path.dirname(file), age, age);
    }
  };

  it('removes old files no row names, half-written files and abandoned upload folders; keeps committed and young ones', async () => {
    const storage = process.env.STORAGE_DIR!;
    const exportsDir = path.join(root, 'exports');
    const tmpRoot = path.join(root, 'upload-tmp');
    // a committed upload, its original made to look old
    const form = await formOf([{ name: 'kept.gpx', bytes: gpxTrack(6, { seed: 99 }) }]);
    const { upload } = await receiveUpload(db, admin, project, form).finally(() => form.cleanup());
    const [kept] = await listUploadFiles(db, upload.id);
    await utimes(path.join(storage, kept.storageKey), old, old);

    const orphanUpload = `uploads/${project.id}/${randomUUID()}`;
    await plant(path.join(storage, orphanUpload, '0-killed.gpx'), old);
    await plant(path.join(storage, `uploads/${project.id}/${upload.id}/0-kept.gpx.123.1700000000000.part`), old);
    const young = `uploads/${project.id}/${randomUUID()}/0-in-flight.gpx`;
    await plant(path.join(storage, young), null);
    await plant(path.join(exportsDir, `audit/${project.id}/${randomUUID()}.csv`), old);
    const abandoned = randomUUID();
    await plant(path.join(tmpRoot, abandoned, '0'), old);
    const inFlight = randomUUID();
    await plant(path.join(tmpRoot, inFlight, '0'), null);

    const report = await sweepOrphanFiles(db, { originals: new LocalStore(storage), exports: new LocalStore(exportsDir), uploadTmpRoot: tmpRoot, minAgeSeconds: 3600 });
    expect(report.originals).toEqual([`${orphanUpload}/0-killed.gpx`]);
    expect(report.partial).toHaveLength(1);
    expect(report.exports).toHaveLength(1);
    expect(report.uploadTmp).toEqual([abandoned]);

    // what a row names stays, however old; the young orphan may still be committed, so it stays too
    expect((await stat(path.join(storage, kept.storageKey))).isFile()).toBe(true);
    expect((await stat(path.join(storage, young))).isFile()).toBe(true);
    expect(await readdir(tmpRoot)).toEqual([inFlight]);
    // the orphan's folder went with it
    await expect(stat(path.join(storage, orphanUpload))).rejects.toMatchObject({ code: 'ENOENT' });
    expect(await countFiles(storage)).toBe(2);
    expect(await countFiles(exportsDir)).toBe(0);
  });
});
