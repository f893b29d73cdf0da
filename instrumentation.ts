// Next.js calls register() once per server start: the job workers start with the server.
export async function register(): Promise<void> {
  if (process.env.NEXT_RUNTIME !== 'nodejs') return;
  const { env } = await import('./lib/env');
  env(); // fail at boot, listing every malformed variable, rather than on the first request
  if ((process.env.JOBS_IN_PROCESS ?? 'true') === 'false') return;
  const { getDb } = await import('./db/client');
  const { startWorkers } = await import('./lib/jobs/queue');
  try {
    await startWorkers(getDb());
  } catch (err) {
    console.error('[trenchbook] job workers did not start', err);
  }
}
