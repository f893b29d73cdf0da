import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import path from 'node:path';
import knexFactory from 'knex';

const root = path.resolve(__dirname, '../..');
const sh = (...args: string[]) => execFileSync('bash', [path.join(root, 'scripts/db.sh'), ...args], { encoding: 'utf8' }).trim();

describe('migrations', () => {
  it('run down to nothing and up again cleanly', async () => {
    sh('recreatedb', 'trenchbook_migrations');
    const url = sh('url', 'trenchbook_migrations');
    const run = (...args: string[]) =>
      execFileSync('npm', ['run', '--silent', ...args], { cwd: root, env: { ...process.env, DATABASE_URL: url }, encoding: 'utf8' });
    const db = knexFactory({ client: 'pg', connection: url });
    const tables = async () =>
      (await db.raw(`select table_name from information_schema.tables where table_schema='public' and table_type='BASE TABLE' and table_name not like 'knex_%' and table_name <> 'spatial_ref_sys' order by 1`)).rows.map(
        (r: { table_name: string }) => r.table_name,
      );
    try {
      run('db:migrate');
      const up = await tables();
      expect(up).toEqual(expect.arrayContaining(['organisations', 'users', 'projects', 'audit_log', 'jobs', 'api_tokens']));
      run('db:rollback');
      expect(await tables()).toEqual([]);
      run('db:migrate');
      expect(await tables()).toEqual(up);
      const idx = (await db.raw(`select indexname from pg_indexes where tablename='projects'`)).rows.map((r: { indexname: string }) => r.indexname);
      expect(idx).toContain('projects_extent_gist');
    } finally {
      await db.destroy();
    }
  });
});
