import { createHash } from 'node:crypto';
import path from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getPhotoFiles } from '@/db/photos';
import { receivePhoto } from '@/lib/services/photos';
import { storeOriginals } from '@/lib/services/originals';
import { originalsStore } from '@/lib/storage/originals-store';
import { countFiles } from '../helpers/fixtures';
import { makeRecordPlan, type RecordPlan } from '../helpers/record-plan';
import { formOf } from '../helpers/upload-form';
import { startWorker, waitFor, type Proc } from './processes';

// A photo's original and thumbnail are stored before its row commits (so the row never names a file that is
// not there). A request killed between the two leaves both files behind, named by no row: the worker's
// start-up sweep must take them, and must keep every committed photo's original and thumbnail
// (db/stored-files.ts lists both columns).
const db = getDb();
let plan: RecordPlan;
const started: Proc[] = [];

beforeAll(async () => {
  plan = await makeRecordPlan(db, 'Photo faults', [9.45, 52.45]);
});
afterAll(async () => {
  for (const p of started) await p.stop();
  await closeDb();
});

const jpeg = (shade: number) => sharp({ create: { width: 320, height: 240, channels: 3, background: { r: shade, g: 90, b: 60 } } }).jpeg().toBuffer();

describe('a photo request killed before its row commits', () => {
  it('leaves an original and a thumbnail that the worker sweeps at start-up; committed photos keep both files', async () => {
    const folder = path.join(process.env.STORAGE_DIR!, 'photos', plan.project.id);
    const form = await formOf([{ name: 'kept.jpg', bytes: await jpeg(10) }], { routeId: plan.routes.get('S-1')!, chainageM: '30' });
    const { photo } = await receivePhoto(db, plan.surveyor, plan.project, form).finally(() => form.cleanup());
    const kept = (await getPhotoFiles(db, photo.id))!;

    // what the killed request had written: the original (storeOriginals, as receivePhoto does) and its thumbnail
    const bytes = await jpeg(200);
    const prefix = `photos/${plan.project.id}/0b9e2f3c-5d1a-4c8e-9f00-000000000001`;
    const killed = await formOf([{ name: 'killed.jpg', bytes }]);
    await storeOriginals(prefix, killed.files, [bytes]).finally(() => killed.cleanup());
    await originalsStore().put(`${prefix}/thumbnail.jpg`, await sharp(bytes).resize(160).jpeg().toBuffer());
    expect(await countFiles(folder)).toBe(4);
    expect(createHash('sha256').update(bytes).digest('hex')).not.toBe(kept.sha256);

    const w = await startWorker({ ORPHAN_MIN_AGE_SECONDS: '0' });
    started.push(w);
    await waitFor('the sweep', async () => (await countFiles(folder)) === 2, 30_000, 200);
    expect([await originalsStore().size(kept.storageKey), await originalsStore().size(kept.thumbnailKey)].every((n) => n !== undefined && n > 0)).toBe(true);
    await w.stop();
  });
});
