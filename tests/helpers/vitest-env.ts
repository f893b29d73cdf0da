import { execFileSync } from 'node:child_process';
import path from 'node:path';

// Each test file runs against the test database that the global setup made fresh for this run.
const root = path.resolve(__dirname, '../..');
process.env.DATABASE_URL = execFileSync('bash', [path.join(root, 'scripts/db.sh'), 'url', process.env.TEST_DB ?? 'trenchbook_test'], { encoding: 'utf8' }).trim();
process.env.NEXTAUTH_SECRET ??= 'vitest-secret-not-for-production';
process.env.EXPORTS_DIR ??= path.join(root, '.data/test-exports');
