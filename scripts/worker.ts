// npm run worker: the job workers and housekeeping (stuck jobs, orphan files) in a process of their own.
// `npm start` runs it beside the web server; JOBS_IN_PROCESS=true runs the same inside the web server instead.
import { closeDb, getDb } from '../db/client';
import { env } from '../lib/env';
import { stopBoss } from '../lib/jobs/boss';
import { startHousekeeping } from '../lib/jobs/housekeeping';
import { startMailLoop } from '../lib/mail/loop';
import { startWorkers } from '../lib/jobs/queue';

// The worker outlives a database that goes away: the queue's own background queries then fail now and then,
// and a failure of one of those must not end the process; housekeeping settles the jobs once it is back.
process.on('unhandledRejection', (err) => console.error('[trenchbook] worker: a background call failed (is the database down?)', err instanceof Error ? err.message : err));

async function main() {
  env(); // fail at once, listing every malformed variable
  const db = getDb();
  const stopHousekeeping = await startHousekeeping(db);
  await startWorkers(db);
  const mail = await startMailLoop(db);
  console.log('trenchbook worker: waiting for jobs');
  console.log(`trenchbook worker: ${mail.where}`);
  const stop = async () => {
    stopHousekeeping();
    await mail.stop();
    await stopBoss();
    await closeDb();
    process.exit(0);
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
