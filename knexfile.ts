import type { Knex } from 'knex';
import { databaseUrl } from './db/connection-url';

const config = {
  client: 'pg',
  connection: databaseUrl(),
  migrations: { directory: './db/migrations', extension: 'ts', tableName: 'knex_migrations' },
  seeds: { directory: './db/seeds', extension: 'ts' },
} satisfies Knex.Config;

export default config;
