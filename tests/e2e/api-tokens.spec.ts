import { expect, test } from '@playwright/test';
import { addUserWithToken, DEMO, json, signIn } from '../helpers/e2e';

test('a token made on the account page works once copied, and stops when revoked', async ({ page, request }) => {
  await signIn(page, DEMO.engineer);
  await page.getByRole('link', { name: 'Account' }).click();
  await page.getByLabel('Token name').fill('office script');
  await page.getByRole('button', { name: 'Create token' }).click();
  const secret = (await page.getByTestId('new-token').textContent())!.trim();
  expect(secret).toMatch(/^tb_/);

  const me = await json<{ user: { role: string; email: string } }>(request, 'GET', '/api/me', secret);
  expect(me.status).toBe(200);
  expect(me.body!.user).toMatchObject({ role: 'engineer', email: DEMO.engineer });

  await page.getByRole('button', { name: 'Revoke office script' }).first().click();
  await expect(page.getByRole('list', { name: 'Your tokens' })).toContainText('Revoked');
  const after = await json<{ error: { code: string; message: string } }>(request, 'GET', '/api/me', secret);
  expect(after.status).toBe(401);
  expect(after.body!.error.message).toContain('revoked');
});

test('malformed Authorization headers are refused with 401', async ({ request }) => {
  for (const header of ['Bearer', 'Bearer ', 'Basic dXNlcjpwYXNz', 'Bearer tb_short', `Bearer tb_${'x'.repeat(43)} extra`, 'token tb_abc']) {
    const res = await request.get('/api/projects', { headers: { Authorization: header } });
    expect(res.status(), header).toBe(401);
    const body = await res.json();
    expect(body.error.code).toBe('unauthenticated');
  }
  // well-formed but unknown
  const res = await request.get('/api/projects', { headers: { Authorization: `Bearer tb_${'A'.repeat(43)}` } });
  expect(res.status()).toBe(401);
  expect((await res.json()).error.message).toContain('unknown');
});

test("a deactivated user's token is refused and a role change takes effect at once", async ({ request }) => {
  const adminToken = addUserWithToken({ email: DEMO.admin, name: 'Maren Oakfield', role: 'admin', org: 'Quillhaven Open Fibre', orgKind: 'owner' });
  const email = `token-user-${Date.now()}@test.example`;
  const token = addUserWithToken({ email, name: 'Token User', role: 'owner', org: 'Quillhaven Open Fibre', orgKind: 'owner' });
  const me = await json<{ user: { id: string; role: string } }>(request, 'GET', '/api/me', token);
  expect(me.body!.user.role).toBe('owner');

  const patched = await json<{ revokedTokens: number }>(request, 'PATCH', `/api/users/${me.body!.user.id}`, adminToken, { role: 'maintenance' });
  expect(patched.status).toBe(200);
  expect(patched.body!.revokedTokens).toBe(1);
  expect((await json(request, 'GET', '/api/me', token)).status).toBe(401);

  const token2 = addUserWithToken({ email, name: 'Token User', role: 'maintenance', org: 'Quillhaven Open Fibre', orgKind: 'owner' });
  expect((await json<{ user: { role: string } }>(request, 'GET', '/api/me', token2)).body!.user.role).toBe('maintenance');
  const off = await json(request, 'PATCH', `/api/users/${me.body!.user.id}`, adminToken, { active: false });
  expect(off.status).toBe(200);
  const refused = await json<{ error: { code: string } }>(request, 'GET', '/api/projects', token2);
  expect(refused.status).toBe(401);
  expect(refused.body!.error.code).toBe('unauthenticated');
});
