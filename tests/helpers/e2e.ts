import { execFileSync } from 'node:child_process';
import path from 'node:path';
import { expect, type APIRequestContext, type Page } from '@playwright/test';

export const DEMO_PASSWORD = 'quillhaven-demo-2026';
export const DEMO = {
  admin: 'admin@quillhaven-fibre.example',
  owner: 'owner@quillhaven-fibre.example',
  maintenance: 'maintenance@quillhaven-fibre.example',
  contractorAdmin: 'admin@tarnwick-civils.example',
  engineer: 'engineer@tarnwick-civils.example',
  surveyor: 'surveyor@tarnwick-civils.example',
} as const;

const root = path.resolve(__dirname, '../..');
const e2eDbUrl = () => execFileSync('bash', [path.join(root, 'scripts/db.sh'), 'url', 'trenchbook_e2e'], { encoding: 'utf8' }).trim();

/** The operators' command (npm run user:add) against the e2e database; returns a fresh API token. */
export function addUserWithToken(u: { email: string; name: string; role: string; org: string; orgKind: 'owner' | 'contractor'; password?: string }): string {
  const args = ['--import', 'tsx', 'scripts/user-add.ts', '--email', u.email, '--name', u.name, '--role', u.role, '--org', u.org, '--org-kind', u.orgKind, '--token'];
  if (u.password) args.push('--password', u.password);
  const out = execFileSync('node', args, { cwd: root, env: { ...process.env, DATABASE_URL: e2eDbUrl() }, encoding: 'utf8' });
  return out.trim().split('\n').at(-1)!;
}

/**
 * TEST ONLY (issue 16, helper E2): an issued handover revision of the project in the e2e database, as a
 * finished build leaves it (tests/helpers/handover-fixture.ts); returns its id.
 */
export function issuedHandoverFixture(projectId: string): string {
  const out = execFileSync('node', ['--import', 'tsx', 'tests/helpers/handover-fixture.ts', projectId], {
    cwd: root, env: { ...process.env, DATABASE_URL: e2eDbUrl(), STORAGE_DIR: path.join(root, '.data/e2e-storage') }, encoding: 'utf8',
  });
  return out.trim().split('\n').at(-1)!;
}

/** TEST ONLY: one approved section in the project (tests/helpers/approved-section-fixture.ts), so a handover can be built. */
export function approvedSectionFixture(projectId: string): string {
  const out = execFileSync('node', ['--import', 'tsx', 'tests/helpers/approved-section-fixture.ts', projectId], { cwd: root, env: { ...process.env, DATABASE_URL: e2eDbUrl() }, encoding: 'utf8' });
  return out.trim().split('\n').at(-1)!;
}

export async function signInThroughForm(page: Page, email: string, password = DEMO_PASSWORD): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

export async function signIn(page: Page, email: string, password = DEMO_PASSWORD): Promise<void> {
  await signInThroughForm(page, email, password);
  await expect(page.getByRole('navigation', { name: 'Main' })).toBeVisible();
}

export const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });

export interface FilePart {
  name: string;
  mimeType: string;
  buffer: Buffer;
}

/** Sends JSON (`data`) or, when `data` is `{ multipart: … }`, a multipart form; returns status and parsed body. */
export async function json<T = Record<string, unknown>>(req: APIRequestContext, method: string, url: string, token: string | null, data?: unknown) {
  const multipart = data && typeof data === 'object' && 'multipart' in data ? (data as { multipart: Record<string, string | FilePart> }).multipart : undefined;
  const res = await req.fetch(url, { method, headers: token ? bearer(token) : {}, ...(multipart ? { multipart } : { data }) });
  const text = await res.text();
  let body: T | null = null;
  try {
    body = JSON.parse(text) as T;
  } catch {
    body = null;
  }
  return { status: res.status(), body };
}
