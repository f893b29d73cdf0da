import { expect, test } from '@playwright/test';
import { DEMO, signIn } from '../helpers/e2e';

// Runs before isolation.spec.ts, which changes the demo's sections. The demo's addresses are seeded by
// db/seeds/04_demo_addresses.ts along the demo streets; Lanternfield Road (QN-101) is built and recorded.

test('on a phone, a maintenance user finds a demo address despite a typo and sees the ducts in front of it', async ({ page }) => {
  await page.setViewportSize({ width: 375, height: 740 });
  await signIn(page, DEMO.maintenance);
  await page.goto('/projects');
  // the top navigation keeps the lookup reachable on a 375 px phone (the links scroll sideways)
  const link = page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Duct lookup' });
  await link.scrollIntoViewIfNeeded();
  await link.click();
  await expect(page).toHaveURL(/\/lookup$/);

  // a transposed letter and "rd" for "road"
  await page.getByLabel('Address').fill('Lanternfeild Rd 5');
  const found = page.getByRole('list', { name: 'Addresses found' }).getByRole('button');
  await expect(found.first()).toContainText('Lanternfield Road');
  await found.first().click();

  const stretches = page.getByTestId('stretch');
  await expect(stretches.first()).toBeVisible();
  await expect(stretches.first()).toContainText('QN-101');
  await expect(stretches.first().getByTestId('radius')).toContainText(/±\d+\.\d\d m \(95 %\)/);
  await expect(stretches.first().getByTestId('ducts')).not.toHaveText('not recorded');
  await expect(stretches.first().getByTestId('cover')).toBeVisible();
  // nearest first
  const distances = await page.getByTestId('distance').allTextContents();
  const metres = distances.map((d) => Number(d.replace(' m', '')));
  expect(metres).toEqual([...metres].sort((a, b) => a - b));
  await expect(page.getByRole('note', { name: 'Cautions' })).toContainText('Records are no substitute for locating on site');
});

test('the printed sheet fits one A4 page and carries the cautions', async ({ page }) => {
  // A4 at 96 dpi
  await page.setViewportSize({ width: 794, height: 1123 });
  await signIn(page, DEMO.maintenance);
  await page.goto('/lookup');
  await page.getByLabel('Address').fill('Lanternfield Road 5');
  await page.getByRole('list', { name: 'Addresses found' }).getByRole('button').first().click();
  await expect(page.getByTestId('stretch').first()).toBeVisible();
  await page.emulateMedia({ media: 'print' });
  await expect(page.getByRole('banner')).toBeHidden();
  await expect(page.getByLabel('Address')).toBeHidden();
  await expect(page.getByTestId('accuracy-statement')).toBeVisible();
  await expect(page.getByRole('note', { name: 'Cautions' })).toContainText('hand-dig within the tolerance zone');
  const pdf = await page.pdf({ format: 'A4', printBackground: true });
  // pages of the PDF: each page object is "/Type /Page" (not "/Pages")
  const pages = pdf.toString('latin1').match(/\/Type\s*\/Page(?!s)/g) ?? [];
  expect(pages.length).toBe(1);
});

test("the owner's administrator changes the organisation's contact on the People page, and the maintenance crew sees the new one", async ({ browser }) => {
  const adminCtx = await browser.newContext();
  const admin = await adminCtx.newPage();
  await signIn(admin, DEMO.admin);
  await admin.goto('/admin/users');
  const form = admin.getByRole('form', { name: 'Contact for the duct lookup' });
  const field = form.getByLabel('Contact');
  const before = await field.inputValue();
  expect(before).toContain('Network desk');
  await field.fill('Fault line +44 1632 960 499 (day and night)');
  await form.getByRole('button', { name: 'Save the contact' }).click();
  await expect(form).toContainText('Saved: the lookup now shows “Fault line +44 1632 960 499 (day and night)”.');

  const crewCtx = await browser.newContext({ viewport: { width: 375, height: 740 } });
  const crew = await crewCtx.newPage();
  await signIn(crew, DEMO.maintenance);
  await crew.goto('/lookup');
  await crew.getByLabel('Address').fill('Lanternfield Road 5');
  await crew.getByRole('list', { name: 'Addresses found' }).getByRole('button').first().click();
  await expect(crew.getByTestId('stretch').first()).toContainText('Fault line +44 1632 960 499 (day and night)');

  // put the demo's contact back for the specs after this one
  await field.fill(before);
  await form.getByRole('button', { name: 'Save the contact' }).click();
  await expect(form).toContainText('Saved:');
  await adminCtx.close();
  await crewCtx.close();
});
