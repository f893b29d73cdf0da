import { expect, test, type Page } from '@playwright/test';
// Named households-*: it runs before the isolation matrix, which reviews, splits and re-plans the demo's sections.
import { DEMO, signIn } from '../helpers/e2e';

// Issue 15's address page on the demo's register: how the serving route was found, passed or why not, the
// drop recorded as installed by the contractor's surveyor on a phone (history row), read only for the owner.
const DEMO_PROJECT = 'Quillhaven North, phase 1';

interface ApiAddress { id: string; key: string; passed: boolean; connected: boolean; notPassedReason: string | null; servingRouteRef: string | null }

async function projectId(page: Page): Promise<string> {
  await page.goto('/projects');
  return (await page.getByRole('link', { name: DEMO_PROJECT }).first().getAttribute('href'))!.split('/')[2];
}

test.describe('on a phone', () => {
  test.use({ viewport: { width: 375, height: 812 }, hasTouch: true, isMobile: true });

  test('a surveyor opens an address, reads why it is (not) passed and records its drop as installed', async ({ page }) => {
    await signIn(page, DEMO.surveyor);
    const pid = await projectId(page);
    const { addresses } = (await (await page.request.get(`/api/projects/${pid}/addresses`)).json()) as { addresses: ApiAddress[] };
    const notPassed = addresses.find((a) => !a.passed && a.notPassedReason && a.servingRouteRef)!;
    await page.goto(`/projects/${pid}/households/addresses/${notPassed.id}`);
    await expect(page.getByText('not passed', { exact: true })).toBeVisible();
    await expect(page.getByText(notPassed.notPassedReason!)).toBeVisible();

    const target = addresses.find((a) => a.passed && !a.connected)!;
    await page.goto(`/projects/${pid}/households/addresses/${target.id}`);
    await expect(page.getByText('Found by')).toBeVisible();
    await page.getByLabel('The drop to this address is installed').check();
    await page.getByLabel('Installed on').fill('2026-11-20');
    await page.getByRole('button', { name: 'Save' }).click();
    await expect(page.getByText('on 2026-11-20')).toBeVisible();
    await expect(page.getByRole('table', { name: 'History of the address' }).getByText('drop installed').first()).toBeVisible();
    const widths = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, client: document.documentElement.clientWidth }));
    expect(widths.scroll).toBeLessThanOrEqual(widths.client);
    const after = (await (await page.request.get(`/api/projects/${pid}/addresses?status=connected`)).json()) as { addresses: ApiAddress[] };
    expect(after.addresses.some((a) => a.id === target.id)).toBe(true);
  });
});

test('the network owner reads an address without the drop form', async ({ page }) => {
  await signIn(page, DEMO.owner);
  const pid = await projectId(page);
  const { addresses } = (await (await page.request.get(`/api/projects/${pid}/addresses`)).json()) as { addresses: ApiAddress[] };
  await page.goto(`/projects/${pid}/households/addresses/${addresses[0].id}`);
  await expect(page.getByText('read only')).toBeVisible();
  await expect(page.getByLabel('The drop to this address is installed')).toHaveCount(0);
  const r = await page.request.patch(`/api/projects/${pid}/addresses/${addresses[0].id}`, { data: { connected: true } });
  expect(r.status()).toBe(403);
});
