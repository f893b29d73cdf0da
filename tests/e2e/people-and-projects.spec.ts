import { expect, test } from '@playwright/test';
import { DEMO, signIn, signInThroughForm } from '../helpers/e2e';

test('an admin invites a person, who sets a password with the one-time link and signs in', async ({ page, browser }) => {
  await signIn(page, DEMO.admin);
  await page.getByRole('link', { name: 'People' }).click();
  const email = `invitee-${Date.now()}@test.example`;
  await page.getByLabel('Name', { exact: true }).fill('Rowan Invitee');
  await page.getByLabel('E-mail', { exact: true }).fill(email);
  await page.getByLabel('Role', { exact: true }).selectOption('maintenance');
  await page.getByRole('button', { name: 'Add person' }).click();
  const link = (await page.getByTestId('one-time-link').textContent())!;
  expect(link).toContain('/welcome/tbl_');
  await expect(page.getByRole('table', { name: 'People' })).toContainText('Rowan Invitee');
  await expect(page.getByRole('row', { name: /Rowan Invitee/ })).toContainText('Invited');

  const other = await browser.newContext();
  const p2 = await other.newPage();
  await p2.goto(new URL(link).pathname);
  await p2.getByLabel('New password').fill('short');
  await p2.getByLabel('Repeat the password').fill('short');
  await p2.getByRole('button', { name: 'Set password' }).click();
  await expect(p2.getByText('Use at least 12 characters.')).toBeVisible();
  await p2.getByLabel('New password').fill('rowan-sets-a-good-one');
  await p2.getByLabel('Repeat the password').fill('rowan-sets-a-good-one');
  await p2.getByRole('button', { name: 'Set password' }).click();
  await expect(p2.getByText(`Password set for ${email}`)).toBeVisible();
  // the link works once
  await p2.goto(new URL(link).pathname);
  await p2.getByLabel('New password').fill('another-good-password');
  await p2.getByLabel('Repeat the password').fill('another-good-password');
  await p2.getByRole('button', { name: 'Set password' }).click();
  await expect(p2.getByText(/expired or was already used/)).toBeVisible();
  await signIn(p2, email, 'rowan-sets-a-good-one');
  await expect(p2.getByTestId('whoami')).toContainText('Maintenance');
  await other.close();
});

test('a deactivated person is signed out on their next request', async ({ page, browser }) => {
  await signIn(page, DEMO.admin);
  await page.goto('/admin/users');
  const email = `temp-${Date.now()}@test.example`;
  await page.getByLabel('Name', { exact: true }).fill('Tam Temporary');
  await page.getByLabel('E-mail', { exact: true }).fill(email);
  await page.getByLabel('First sign-in').selectOption('password');
  await page.getByRole('button', { name: 'Add person' }).click();
  const temp = (await page.getByTestId('temporary-password').textContent())!.trim();

  const other = await browser.newContext();
  const p2 = await other.newPage();
  await signIn(p2, email, temp);
  await page.getByRole('button', { name: 'Deactivate Tam Temporary' }).click();
  await expect(page.getByRole('row', { name: /Tam Temporary/ })).toContainText('Deactivated');
  await p2.goto('/account');
  await expect(p2).toHaveURL(/\/sign-in/);
  await signInThroughForm(p2, email, temp);
  await expect(p2.getByText('That e-mail and password do not match an active account.')).toBeVisible();
  await other.close();
});

test('an admin creates a project with a newly registered partner, edits it, and reads the activity log', async ({ page }) => {
  await signIn(page, DEMO.admin);
  await page.getByRole('link', { name: 'New project' }).click();
  await page.getByRole('button', { name: 'Create project' }).click();
  await expect(page.getByText('Name the project.')).toBeVisible();
  await expect(page.getByText('Pick the contractor from the list, or register it first.')).toBeVisible();
  const name = `Saltmarsh Row ${Date.now()}`;
  await page.getByLabel('Project name').fill(name);
  // the partner is picked; a new one is registered as a step of its own
  const contractors = page.getByLabel('Contractor', { exact: true });
  await expect(contractors.getByRole('option', { name: 'Tarnwick Slot & Duct Ltd' })).toHaveCount(1);
  await page.getByRole('button', { name: 'Not in the list? Register a new contractor' }).click();
  const partner = `Brindle Duct Layers ${Date.now()}`;
  await page.getByLabel('Full name of the new contractor').fill(partner);
  await page.getByRole('button', { name: `Register “${partner}”` }).click();
  await expect(contractors.locator('option:checked')).toHaveText(partner);
  await page.getByLabel('Default coordinate system').fill('999999');
  await page.getByRole('button', { name: 'Create project' }).click();
  await expect(page.getByText('EPSG:999999 is not in the catalogue.')).toBeVisible();
  // the bare EPSG number is enough
  await page.getByLabel('Default coordinate system').fill('25832');
  await page.getByLabel('Time zone').selectOption('Europe/Berlin');
  await page.getByRole('button', { name: 'Create project' }).click();
  await expect(page.getByRole('heading', { name })).toBeVisible();
  await expect(page.getByText(partner)).toBeVisible();
  await expect(page.getByText('EPSG:25832')).toBeVisible();

  await page.getByRole('link', { name: 'Settings' }).click();
  // a tolerance below the plausible floor is refused next to the field, with the range
  await page.getByLabel('Lateral tolerance (m)').fill('1e-300');
  await page.getByRole('button', { name: 'Save settings' }).click();
  await expect(page.getByText('The lateral tolerance must be at least 0.05 m (plausible: 0.05–50 m).')).toBeVisible();
  await page.getByLabel('Lateral tolerance (m)').fill('0.75');
  await page.getByRole('button', { name: 'Save settings' }).click();
  await expect(page.getByText('Settings saved.')).toBeVisible();

  await page.goto(page.url().replace(/\/settings$/, ''));
  await page.getByRole('link', { name: 'Activity log' }).click();
  const table = page.getByRole('table', { name: 'Activity' });
  await expect(table).toContainText('Changed the lateral tolerance from 0.5 m to 0.75 m.');
  await expect(table).toContainText(`Created the project ${name} (network owner Quillhaven Open Fibre, contractor ${partner}).`);
  await expect(table).not.toContainText('{');

  await page.getByRole('button', { name: 'Export as CSV' }).click();
  const download = page.getByRole('link', { name: 'Download the CSV' });
  await expect(download).toBeVisible({ timeout: 20_000 });
  const res = await page.request.get((await download.getAttribute('href'))!);
  expect(res.status()).toBe(200);
  const csv = await res.text();
  expect(csv.split('\n')[0]).toBe('id,at,actor,object_type,object_id,action,before,after');
  expect(csv).toContain('Maren Oakfield');
});

test('people outside both organisations do not see the project', async ({ page }) => {
  await signIn(page, DEMO.surveyor);
  await page.goto('/projects');
  const link = page.getByRole('link', { name: 'Quillhaven North, phase 1' });
  const href = (await link.getAttribute('href'))!;
  await page.goto(href);
  await expect(page.getByRole('heading', { name: 'Quillhaven North, phase 1' })).toBeVisible();
  await expect(page.getByRole('link', { name: 'Settings' })).toHaveCount(0);
  await page.goto('/projects/00000000-0000-4000-8000-000000000000');
  await expect(page.getByText(/could not be found|404/i).first()).toBeVisible();
});
