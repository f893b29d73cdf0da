import { expect, test } from '@playwright/test';
import { addUserWithToken, DEMO, json, signIn } from '../helpers/e2e';

// A project of its own, so the demo's register (and the specs that count it) is left alone.
let projectId: string;

test.beforeAll(async ({ request }) => {
  const admin = addUserWithToken({ email: DEMO.contractorAdmin, name: 'Ilse Marrowby', role: 'admin', org: 'Tarnwick Slot & Duct Ltd', orgKind: 'contractor' });
  const p = await json<{ project: { id: string } }>(request, 'POST', '/api/projects', admin, { name: `Saltmarsh addresses ${Date.now()}`, partnerOrganisation: 'Quillhaven Open Fibre' });
  expect(p.status).toBe(201);
  projectId = p.body!.project.id;
});

const register = (units: string) =>
  ['Premises Ref,Street,Number,Households,Lon,Lat', 'P-1,Saltmarsh Row,1,1,9.20010,52.20010', `P-2,Saltmarsh Row,3,${units},9.20030,52.20012`, 'P-3,Saltmarsh Row,5,,9.20050,52.20014', ''].join('\n');

test('on a phone, an engineer previews a register with a bad row, fixes the mapping and the file, and imports it', async ({ page }) => {
  await page.setViewportSize({ width: 375, height: 812 });
  await signIn(page, DEMO.engineer);
  await page.goto(`/projects/${projectId}/households/import`);
  await expect(page.getByRole('heading', { name: 'Address register imports' })).toBeVisible();

  await page.getByLabel('Address register file').setInputFiles({ name: 'register.csv', mimeType: 'text/csv', buffer: Buffer.from(register('two')) });
  await page.getByRole('button', { name: 'Preview' }).click();
  // "Premises Ref" is no usual name for the key: the person picks it
  await expect(page.getByText(/No column is mapped to key/)).toBeVisible();
  await expect(page.getByRole('button', { name: /^Import/ })).toBeDisabled();
  await page.getByLabel("Column for Key (the register's own id)").selectOption('Premises Ref');
  await expect(page.getByLabel('Column for Street')).toHaveValue('Street');
  await page.getByRole('button', { name: 'Preview' }).click();

  const report = page.getByRole('list', { name: 'Rows that cannot be imported' });
  await expect(report).toContainText("Row 3 (P-2): units 'two' is not a whole number of 1 or more");
  await expect(page.getByRole('button', { name: /^Import/ })).toBeDisabled();

  await page.getByLabel('Address register file').setInputFiles({ name: 'register-fixed.csv', mimeType: 'text/csv', buffer: Buffer.from(register('2')) });
  await page.getByRole('button', { name: 'Preview' }).click();
  await expect(page.getByTestId('count-added')).toHaveText('3');
  await expect(report).toHaveCount(0);
  await page.getByRole('button', { name: 'Import 3 addresses' }).click();
  await expect(page.getByText('Imported register-fixed.csv: 3 addresses; 3 added, 0 changed, 0 removed, 0 restored, 0 unchanged.')).toBeVisible();
  const list = page.getByRole('table', { name: 'Past imports' });
  await expect(list).toContainText('register-fixed.csv');
  await expect(list).toContainText('3 added');
  await expect(list).toContainText('Osric Fennimore');
  // no sideways scrolling on a phone
  expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(375);
});

test('a surveyor sees the past imports but no import form', async ({ page }) => {
  await signIn(page, DEMO.surveyor);
  await page.goto(`/projects/${projectId}/households/import`);
  await expect(page.getByRole('table', { name: 'Past imports' })).toBeVisible();
  await expect(page.getByLabel('Address register file')).toHaveCount(0);
});
