import knexFactory, { type Knex } from 'knex';
import pg from 'pg';
import { databaseUrl } from './connection-url';

// numeric/bigint columns come back as JS numbers: counts and ids here stay far below 2^53
pg.types.setTypeParser(20, (v) => Number(v));
pg.types.setTypeParser(1700, (v) => Number(v));

const globalForDb = globalThis as unknown as { __trenchbookDb?: Knex };

/** The shared Knex instance, cached on globalThis so dev reloads and tests reuse one pool. */
export function getDb(): Knex {
  if (!globalForDb.__trenchbookDb) {
    globalForDb.__trenchbookDb = knexFactory({
      client: 'pg',
      connection: databaseUrl(),
      pool: { min: 0, max: 10 },
    });
  }
  return globalForDb.__trenchbookDb;
}

export async function closeDb(): Promise<void> {
  if (globalForDb.__trenchbookDb) {
    await globalForDb.__trenchbookDb.destroy();
    globalForDb.__trenchbookDb = undefined;
  }
}

export type Db = Knex | Knex.Transaction;
