// Next.js calls register() once per server start. By default jobs run in the worker process that
// `npm start` starts beside the web server; JOBS_IN_PROCESS=true runs them (and housekeeping) in here.
export async function register(): Promise<void> {
  if (process.env.NEXT_RUNTIME !== 'nodejs') return;
  const { env } = await import('./lib/env');
  const e = env(); // fail at boot, listing every malformed variable, rather than on the first request
  if (e.JOBS_IN_PROCESS !== 'true') return;
  const { getDb } = await import('./db/client');
  const { startWorkers } = await import('./lib/jobs/queue');
  const { startHousekeeping } = await import('./lib/jobs/housekeeping');
  try {
    await startHousekeeping(getDb());
    await startWorkers(getDb());
    const { startMailLoop } = await import('./lib/mail/loop');
    console.log(`[trenchbook] ${(await startMailLoop(getDb())).where}`);
  } catch (err) {
    console.error('[trenchbook] job workers did not start', err);
  }
}
