import { expect, test, type Page } from '@playwright/test';
import { DEMO, signIn } from '../helpers/e2e';

const DEMO_PROJECT = 'Quillhaven North, phase 1';

async function demoProjectPath(page: Page): Promise<string> {
  await page.goto('/projects');
  return (await page.getByRole('link', { name: DEMO_PROJECT }).first().getAttribute('href'))!;
}

test('addresses that lead nowhere get a styled page with a way back', async ({ page }) => {
  await signIn(page, DEMO.engineer);
  const base = await demoProjectPath(page);
  await page.goto('/projects/00000000-0000-4000-8000-000000000000');
  await expect(page.getByRole('heading', { name: 'This page could not be found' })).toBeVisible();
  await expect(page.getByRole('navigation', { name: 'Main' })).toBeVisible();
  await page.getByRole('link', { name: 'Your projects' }).click();
  await expect(page.getByRole('heading', { name: 'Projects' })).toBeVisible();

  // inside a project: under its tabs, with links into the project
  for (const path of [`${base}/no-such-tab`, `${base}/uploads/00000000-0000-4000-8000-000000000000`]) {
    await page.goto(path);
    await expect(page.getByRole('heading', { name: 'Not part of this project' })).toBeVisible();
    await expect(page.getByRole('navigation', { name: 'Project' })).toBeVisible();
  }
  await page.getByRole('link', { name: 'Project overview' }).click();
  await expect(page.getByRole('heading', { name: DEMO_PROJECT })).toBeVisible();

  await page.goto('/nowhere-at-all');
  await expect(page.getByRole('heading', { name: 'This page could not be found' })).toBeVisible();
});

test('the project page shows progress, sections by status, latest uploads and background work', async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.goto(await demoProjectPath(page));
  await expect(page.getByRole('heading', { name: DEMO_PROJECT })).toBeVisible();
  for (const title of ['Progress', 'Sections by status', 'Latest uploads', 'Latest background work', 'Settings']) {
    await expect(page.getByRole('heading', { name: title, exact: true })).toBeVisible();
  }
  // an owner adds no uploads, so there is no button for it
  await expect(page.getByRole('link', { name: 'Add field uploads' })).toHaveCount(0);
  await expect(page.getByText(/features\b/)).toHaveCount(0);
});

test.describe('on a phone', () => {
  test.use({ viewport: { width: 390, height: 844 }, hasTouch: true, isMobile: true });

  test('pages fit the screen: one header row, one row of tabs, tables as cards', async ({ page }) => {
    await signIn(page, DEMO.admin);
    const base = await demoProjectPath(page);
    for (const path of ['/projects', base, `${base}/uploads`, `${base}/reconciliation`, `${base}/activity`, `${base}/settings`]) {
      await page.goto(path);
      await page.waitForLoadState('networkidle');
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect(overflow, `${path} scrolls sideways`).toBeLessThanOrEqual(0);
      const header = await page.locator('header').boundingBox();
      expect(header!.height, `${path}: header on one row`).toBeLessThan(64);
      if (path !== '/projects') {
        const tabs = await page.getByRole('navigation', { name: 'Project' }).boundingBox();
        expect(tabs!.height, `${path}: project tabs on one row`).toBeLessThan(48);
      }
    }
    // the sections table: each row a card, its status visible without scrolling sideways
    await page.goto(`${base}/reconciliation`);
    const table = page.getByRole('table', { name: 'Sections' });
    const firstCell = table.locator('tbody tr').first().locator('td').nth(1);
    const box = await firstCell.boundingBox();
    if (box) expect(box.x + box.width).toBeLessThanOrEqual(390);
  });

  test('a map says it is loading, then lets one finger scroll the page past it', async ({ page }) => {
    await signIn(page, DEMO.engineer);
    const base = await demoProjectPath(page);
    await page.goto(`${base}/plan`);
    const map = page.getByRole('region', { name: /map/i }).first();
    await expect(map).toBeVisible();
    await expect(map).toHaveAttribute('aria-busy', 'false', { timeout: 20_000 });
    await expect(page.getByText('Loading the map…')).toHaveCount(0);
    // MapLibre's cooperative gestures on a touch screen: the map asks for two fingers instead of taking the scroll
    await expect(page.locator('.maplibregl-cooperative-gesture-screen')).toHaveCount(1);
  });
});
