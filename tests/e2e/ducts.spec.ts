import { expect, test, type Page } from '@playwright/test';
import { DEMO, signIn } from '../helpers/e2e';

const DEMO_PROJECT = 'Quillhaven North, phase 1';

async function demoProjectPath(page: Page): Promise<string> {
  await page.goto('/projects');
  return (await page.getByRole('link', { name: DEMO_PROJECT }).first().getAttribute('href'))!;
}

// a phone at the kerb
test.use({ viewport: { width: 390, height: 844 }, hasTouch: true });

test('a surveyor fills a bundle from the plan, records it and a connector; the owner reads without forms', async ({ page }) => {
  await signIn(page, DEMO.surveyor);
  const base = await demoProjectPath(page);
  await page.goto(`${base}/records/ducts`);
  await expect(page.getByRole('heading', { name: 'Duct bundles' })).toBeVisible();
  await page.getByRole('button', { name: 'Derive planned bundles from the plan' }).click();
  await expect(page.getByText(/\d+ derived, \d+ removed, \d+ unchanged/)).toBeVisible();

  const form = page.getByRole('form', { name: 'Record an installed bundle' });
  const route = form.getByLabel('Route', { exact: true });
  const option = route.locator('option', { hasText: 'QN-104' });
  await route.selectOption((await option.getAttribute('value'))!);
  // a stretch of its own each run, so a retry does not overlap the first try's bundle
  const from = (Date.now() % 40) + 1;
  await form.getByLabel('From chainage (m)').fill(String(from));
  await form.getByLabel('To chainage (m)').fill(String(from + 0.5));
  await form.getByRole('button', { name: /^Fill from the plan \(4 × 7\/4 mm\)$/ }).click();
  await expect(form.getByRole('group', { name: 'Duct 4' })).toBeVisible();
  await expect(form.getByRole('group', { name: 'Duct 3' }).getByLabel('Colour')).toHaveValue('3');
  await expect(form.getByRole('group', { name: 'Duct 3' }).getByText('green', { exact: true })).toBeVisible();
  await form.getByRole('group', { name: 'Duct 4' }).getByLabel('Purpose').selectOption('spare');
  await form.getByRole('button', { name: 'Save bundle' }).click();
  await expect(form.getByText('Bundle saved.')).toBeVisible();
  await expect(page.getByText(`QN-104 ${from.toFixed(1)} m–${(from + 0.5).toFixed(1)} m`)).toBeVisible();

  // change it: protective fill was placed after all
  const listed = await (await page.request.get(`/api${base}/duct-bundles?kind=installed`)).json();
  const mine = listed.bundles.find((b: { routeRef: string; fromChainageM: number }) => b.routeRef === 'QN-104' && b.fromChainageM === from);
  await page.goto(`${base}/records/ducts?edit=${mine.id}`);
  const change = page.getByRole('form', { name: /^Change the bundle on QN-104/ });
  await expect(change.getByRole('group', { name: 'Duct 4' }).getByLabel('Purpose')).toHaveValue('spare');
  await change.getByLabel('Protective fill placed over the ducts').check();
  await change.getByRole('button', { name: 'Save changes' }).click();
  await expect(page).toHaveURL(new RegExp(`/records/ducts#bundle-${mine.id}$`));
  await expect(page.getByRole('row').filter({ hasText: `QN-104 ${from.toFixed(1)} m–${(from + 0.5).toFixed(1)} m` }).getByText('yes / yes / yes')).toBeVisible();

  const joint = page.getByRole('form', { name: 'Record a joint or connector' });
  await joint.getByRole('button', { name: 'Route and chainage' }).click();
  await joint.getByLabel('Route', { exact: true }).selectOption((await joint.getByLabel('Route', { exact: true }).locator('option', { hasText: 'QN-104' }).getAttribute('value'))!);
  await joint.getByLabel('Chainage (m)').fill(String(from + 0.5));
  await joint.getByRole('group', { name: 'Ducts joined' }).getByRole('button', { name: '1', exact: true }).click();
  await joint.getByRole('button', { name: 'Save joint' }).click();
  await expect(joint.getByText('Joint saved.')).toBeVisible();
  await expect(page.getByText(`QN-104 at ${(from + 0.5).toFixed(1)} m`)).toBeVisible();

  // the network owner's people read the bundles, with no form to record one
  await page.context().clearCookies();
  await signIn(page, DEMO.owner);
  await page.goto(`${base}/records/ducts`);
  await expect(page.getByText(`QN-104 ${from.toFixed(1)} m–${(from + 0.5).toFixed(1)} m`)).toBeVisible();
  await expect(page.getByRole('form', { name: 'Record an installed bundle' })).toHaveCount(0);
  await expect(page.getByText(/surveyors and engineers record duct bundles and joints/)).toBeVisible();
});
