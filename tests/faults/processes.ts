import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import { existsSync } from 'node:fs';
import path from 'node:path';

export const root = path.resolve(__dirname, '../..');
export const FAULTS_PGPORT = process.env.FAULTS_PGPORT ?? '54338';
export const FAULTS_DB = 'trenchbook_faults';

/** scripts/db.sh on the fault suite's own cluster (PGPORT alone picks it). */
export function sh(args: string[]): string {
  const env: NodeJS.ProcessEnv = { ...process.env, PGPORT: FAULTS_PGPORT };
  Reflect.deleteProperty(env, 'DATABASE_URL');
  return execFileSync('bash', [path.join(root, 'scripts/db.sh'), ...args], { encoding: 'utf8', env, stdio: ['ignore', 'pipe', 'pipe'] }).trim();
}

export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Polls until `check` gives a value (not undefined/false) or the time is up. */
export async function waitFor<T>(what: string, check: () => Promise<T | undefined | false> | T | undefined | false, timeoutMs = 30_000, everyMs = 50): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = await Promise.resolve(check()).catch(() => undefined);
    if (v !== undefined && v !== false) return v as T;
    if (Date.now() > until) throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}`);
    await sleep(everyMs);
  }
}

export interface Proc {
  child: ChildProcess;
  output: () => string;
  kill9: () => Promise<void>;
  stop: () => Promise<void>;
}

function track(child: ChildProcess): Proc {
  let out = '';
  child.stdout?.on('data', (d) => (out += d));
  child.stderr?.on('data', (d) => (out += d));
  const exited = new Promise<void>((r) => child.once('exit', () => r()));
  const signal = async (sig: NodeJS.Signals) => {
    if (child.exitCode !== null || child.signalCode !== null) return;
    child.kill(sig);
    await exited;
  };
  return { child, output: () => out, kill9: () => signal('SIGKILL'), stop: () => signal('SIGTERM') };
}

/** The product's environment for a child process on the fault database, plus overrides. */
export function productEnv(extra: Record<string, string> = {}): NodeJS.ProcessEnv {
  return {
    ...process.env,
    PGPORT: FAULTS_PGPORT,
    DATABASE_URL: process.env.DATABASE_URL,
    NEXTAUTH_SECRET: process.env.NEXTAUTH_SECRET,
    STORAGE_DIR: process.env.STORAGE_DIR,
    EXPORTS_DIR: process.env.EXPORTS_DIR,
    UPLOAD_TMP_DIR: process.env.UPLOAD_TMP_DIR,
    JOB_HEARTBEAT_SECONDS: '1',
    // the worker's fake SMTP server on any free port, never a developer's 2525; mail sent every second
    MAIL_FAKE_PORT: '0',
    MAIL_INTERVAL_SECONDS: '1',
    ...extra,
  };
}

/** `npm run worker`'s process, started and waited for until it takes jobs. */
export async function startWorker(extra: Record<string, string> = {}): Promise<Proc> {
  const p = track(spawn('node', ['--import', 'tsx', 'scripts/worker.ts'], { cwd: root, env: productEnv(extra), stdio: ['ignore', 'pipe', 'pipe'] }));
  await waitFor('the worker to take jobs', () => p.output().includes('waiting for jobs') || (p.child.exitCode !== null && Promise.reject(new Error(p.output()))), 60_000);
  return p;
}

/** The web server as npm start runs it (scripts/server.ts on the build), waited for until /api/health answers. */
export async function startServer(port: number, extra: Record<string, string> = {}): Promise<Proc> {
  if (!existsSync(path.join(root, '.next/BUILD_ID'))) throw new Error('the web server needs a finished `next build` (npm test runs one before test:faults)');
  const p = track(spawn('node', ['--import', 'tsx', 'scripts/server.ts'], { cwd: root, env: productEnv({ PORT: String(port), NEXTAUTH_URL: `http://127.0.0.1:${port}`, ...extra }), stdio: ['ignore', 'pipe', 'pipe'] }));
  await waitFor('the web server to answer', async () => {
    if (p.child.exitCode !== null) throw new Error(p.output());
    return (await fetch(`http://127.0.0.1:${port}/api/health`)).ok;
  }, 60_000, 200);
  return p;
}
