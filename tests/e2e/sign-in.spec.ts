import { expect, test } from '@playwright/test';
import { addUserWithToken, DEMO, signIn, signInThroughForm } from '../helpers/e2e';

const ROLE_NAV: [keyof typeof DEMO, string, string[]][] = [
  ['admin', 'Administrator', ['Projects', 'Duct lookup', 'People', 'Activity', 'E-mail', 'Account']],
  ['engineer', 'Engineer', ['Projects', 'Duct lookup', 'Account']],
  ['surveyor', 'Surveyor', ['Projects', 'Duct lookup', 'Account']],
  ['owner', 'Network owner', ['Projects', 'Duct lookup', 'Account']],
  ['maintenance', 'Maintenance', ['Projects', 'Duct lookup', 'Account']],
];

for (const [who, label, nav] of ROLE_NAV) {
  test(`${label} signs in and sees their own navigation`, async ({ page }) => {
    await signIn(page, DEMO[who]);
    await expect(page).toHaveURL(/\/projects$/);
    await expect(page.getByTestId('whoami')).toContainText(label);
    const items = page.getByRole('navigation', { name: 'Main' }).getByRole('link');
    await expect(items).toHaveText(nav);
    await expect(page.getByRole('link', { name: 'Quillhaven North, phase 1' })).toBeVisible();
  });
}

test('a wrong password gets the message and no session', async ({ page }) => {
  await signInThroughForm(page, DEMO.owner, 'not-the-password-at-all');
  await expect(page.getByText('That e-mail and password do not match an active account.')).toBeVisible();
  const session = await page.request.get('/api/auth/session');
  expect(await session.json()).toEqual({});
  await page.goto('/projects');
  await expect(page).toHaveURL(/\/sign-in/);
});

test('signing out ends the session', async ({ page }) => {
  await signIn(page, DEMO.surveyor);
  await page.getByRole('button', { name: 'Sign out' }).click();
  await expect(page).toHaveURL(/\/sign-in/);
  await page.goto('/account');
  await expect(page).toHaveURL(/\/sign-in/);
});

test('the sign-in limit trips after repeated failures and recovers after the window', async ({ page }) => {
  // this server allows 3 failures per e-mail in 8 s (scripts/e2e-server.sh)
  const email = `limit-${Date.now()}@test.example`;
  addUserWithToken({ email, name: 'Limit Tester', role: 'surveyor', org: 'Tarnwick Slot & Duct Ltd', orgKind: 'contractor', password: 'limit-tester-password' });
  for (let i = 0; i < 3; i++) {
    await signInThroughForm(page, email, `wrong-password-${i}`);
    await expect(page.getByText('That e-mail and password do not match an active account.')).toBeVisible();
  }
  await signInThroughForm(page, email, 'limit-tester-password');
  await expect(page.getByText('Too many failed sign-ins. Wait a few minutes, then try again.')).toBeVisible();
  await page.waitForTimeout(8_500);
  await signIn(page, email, 'limit-tester-password');
  await expect(page.getByTestId('whoami')).toContainText('Surveyor');
});
