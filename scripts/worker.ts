// npm run worker: job workers in their own process (set JOBS_IN_PROCESS=false on the web server then).
import { closeDb, getDb } from '../db/client';
import { stopBoss } from '../lib/jobs/boss';
import { startWorkers } from '../lib/jobs/queue';

async function main() {
  await startWorkers(getDb());
  console.log('trenchbook worker: waiting for jobs (Ctrl-C to stop)');
  const stop = async () => {
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
