import type { Knex } from 'knex';
import { uploadTmpRoot } from '@/lib/api/multipart';
import { env } from '@/lib/env';
import { settleHandovers } from '@/lib/services/handovers';
import { sweepOrphanFiles, type SweepReport } from '@/lib/services/orphans';
import { exportsStore } from '@/lib/storage/exports-store';
import { originalsStore } from '@/lib/storage/originals-store';
import { getBoss } from './boss';
import { MISSED_BEATS, settleJobs, type SettleOutcome } from './settle';

/** One pass: stuck jobs failed with their reason, orphan files removed. */
export async function housekeep(db: Knex, what: { jobs?: boolean; files?: boolean } = { jobs: true, files: true }): Promise<{ jobs: SettleOutcome[]; files: SweepReport | null }> {
  const e = env();
  const jobs = what.jobs ? await settleJobs(db, await getBoss(), e.JOB_HEARTBEAT_SECONDS) : [];
  // a handover package whose build job ended without issuing it is failed with the job's reason
  if (what.jobs) await settleHandovers(db);
  const files = what.files
    ? await sweepOrphanFiles(db, { originals: originalsStore(), exports: exportsStore(), uploadTmpRoot: uploadTmpRoot(), minAgeSeconds: e.ORPHAN_MIN_AGE_SECONDS })
    : null;
  for (const j of jobs) console.log(`[trenchbook] housekeeping: job ${j.jobId} (${j.kind}, was ${j.was}) failed: ${j.reason}`);
  const removed = files ? files.originals.length + files.exports.length + files.partial.length + files.uploadTmp.length : 0;
  if (files && removed > 0) console.log(`[trenchbook] housekeeping: removed ${files.originals.length} orphan originals, ${files.exports.length} orphan exports, ${files.partial.length} half-written files, ${files.uploadTmp.length} abandoned upload folders`);
  return { jobs, files };
}

/**
 * Runs housekeeping at once and then on a schedule: the job check every few heartbeats, the file sweep every
 * HOUSEKEEPING_INTERVAL_SECONDS. Returns a function that stops the timers. A failed pass (say, the database
 * is down) is logged and the next one tries again.
 */
export async function startHousekeeping(db: Knex): Promise<() => void> {
  const e = env();
  const pass = (what: { jobs?: boolean; files?: boolean }) => housekeep(db, what).catch((err) => console.error('[trenchbook] housekeeping failed; trying again later', err));
  await pass({ jobs: true, files: true });
  const jobsTimer = setInterval(() => void pass({ jobs: true }), MISSED_BEATS * e.JOB_HEARTBEAT_SECONDS * 1000);
  const filesTimer = setInterval(() => void pass({ files: true }), e.HOUSEKEEPING_INTERVAL_SECONDS * 1000);
  return () => {
    clearInterval(jobsTimer);
    clearInterval(filesTimer);
  };
}
