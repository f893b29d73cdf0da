import { execFileSync } from 'node:child_process';
import path from 'node:path';

const root = path.resolve(__dirname, '../..');
const TEST_DB = process.env.TEST_DB ?? 'trenchbook_test';

/** Starts the project's database server and gives the run a fresh, migrated test database. */
export default function setup(): void {
  const sh = (...args: string[]) => execFileSync('bash', [path.join(root, 'scripts/db.sh'), ...args], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'inherit'] }).trim();
  sh('start');
  sh('recreatedb', TEST_DB);
  const url = sh('url', TEST_DB);
  execFileSync('npm', ['run', '--silent', 'db:migrate'], { cwd: root, env: { ...process.env, DATABASE_URL: url }, stdio: 'inherit' });
  process.env.DATABASE_URL = url;
}
