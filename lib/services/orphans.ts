import { readdir, rm, stat } from 'node:fs/promises';
import path from 'node:path';
import type { Knex } from 'knex';
import { committedExportKeys, committedOriginalKeys } from '@/db/stored-files';
import { PARTIAL_SUFFIX, type ObjectStore, type StoredObject } from '@/lib/storage';

export interface SweepOptions {
  originals: ObjectStore;
  exports: ObjectStore;
  /** the folder uploads stream to while they arrive (one sub-folder a request) */
  uploadTmpRoot: string;
  /** files younger than this may belong to a request still in flight, and are left alone */
  minAgeSeconds: number;
  now?: Date;
}

export interface SweepReport {
  /** stored originals no committed row names */
  originals: string[];
  /** export files no job names */
  exports: string[];
  /** half-written files (`.part`) in either store */
  partial: string[];
  /** request folders of uploads that never finished */
  uploadTmp: string[];
}

const BATCH = 500;

async function sweepStore(store: ObjectStore, committed: (keys: string[]) => Promise<Set<string>>, cutoff: number, report: { orphans: string[]; partial: string[] }) {
  let batch: StoredObject[] = [];
  const flush = async () => {
    const known = await committed(batch.map((o) => o.key));
    for (const o of batch) {
      if (known.has(o.key)) continue;
      await store.remove(o.key);
      report.orphans.push(o.key);
    }
    batch = [];
  };
  for await (const o of store.list()) {
    if (o.modifiedAt.getTime() > cutoff) continue;
    if (o.key.endsWith(PARTIAL_SUFFIX)) {
      await store.remove(o.key);
      report.partial.push(o.key);
      continue;
    }
    batch.push(o);
    if (batch.length >= BATCH) await flush();
  }
  if (batch.length) await flush();
}

/**
 * Removes what a killed request or job leaves behind, once it is older than `minAgeSeconds`: stored
 * originals no committed upload or plan row names (kept if a row names them, however old), export files
 * no job names, half-written `.part` files, and upload request folders in the temporary folder. Folders
 * left empty go too. Run at worker start-up and on a schedule (lib/jobs/housekeeping.ts).
 */
export async function sweepOrphanFiles(db: Knex, o: SweepOptions): Promise<SweepReport> {
  const cutoff = (o.now ?? new Date()).getTime() - o.minAgeSeconds * 1000;
  const originals = { orphans: [] as string[], partial: [] as string[] };
  const exported = { orphans: [] as string[], partial: [] as string[] };
  await sweepStore(o.originals, (keys) => committedOriginalKeys(db, keys), cutoff, originals);
  await sweepStore(o.exports, (keys) => committedExportKeys(db, keys), cutoff, exported);

  const uploadTmp: string[] = [];
  const entries = await readdir(o.uploadTmpRoot).catch(() => [] as string[]);
  for (const name of entries) {
    const dir = path.join(o.uploadTmpRoot, name);
    const s = await stat(dir).catch(() => undefined);
    if (!s || s.mtime.getTime() > cutoff) continue;
    await rm(dir, { recursive: true, force: true });
    uploadTmp.push(name);
  }
  return { originals: originals.orphans, exports: exported.orphans, partial: [...originals.partial, ...exported.partial], uploadTmp };
}
