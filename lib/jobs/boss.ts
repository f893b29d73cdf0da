import PgBoss from 'pg-boss';
import { databaseUrl } from '@/db/connection-url';

const g = globalThis as unknown as { __trenchbookBoss?: Promise<PgBoss> };

/** One started pg-boss per process, on the application database (schema `pgboss`). */
export function getBoss(): Promise<PgBoss> {
  g.__trenchbookBoss ??= (async () => {
    const boss = new PgBoss({
      connectionString: databaseUrl(),
      schema: 'pgboss',
      max: 4,
    });
    boss.on('error', (err) => console.error('[trenchbook] job queue error', err));
    await boss.start();
    return boss;
  })();
  return g.__trenchbookBoss;
}

export async function stopBoss(): Promise<void> {
  if (g.__trenchbookBoss) {
    const boss = await g.__trenchbookBoss;
    g.__trenchbookBoss = undefined;
    await boss.stop({ graceful: true, wait: true });
  }
}
