import { execFileSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect, test, type Page } from '@playwright/test';
// Named households*: it runs before the isolation matrix, which reviews, splits and re-plans the demo's sections.
import { DEMO, signIn } from '../helpers/e2e';

// Issue 15's households page on the demo's register (db/seeds/04_demo_addresses.ts): the counts agree with
// the API, the table filters by status and opens an address, the exports parse; the owner's maintenance
// user reads without the import; on a phone nothing scrolls sideways.
const DEMO_PROJECT = 'Quillhaven North, phase 1';

interface ApiAddress { id: string; key: string; street: string; number: string; units: number; passed: boolean; connected: boolean }

async function householdsPath(page: Page): Promise<string> {
  await page.goto('/projects');
  const base = (await page.getByRole('link', { name: DEMO_PROJECT }).first().getAttribute('href'))!;
  return `${base}/households`;
}

const tile = (page: Page, label: string) => page.getByRole('group', { name: label, exact: true }).locator('[data-figure]');

test('an engineer sees the counts the API gives, filters passed, opens an address and downloads CSV and Excel', async ({ page }) => {
  await signIn(page, DEMO.engineer);
  const url = await householdsPath(page);
  const projectId = url.split('/')[2];
  const { addresses } = (await (await page.request.get(`/api/projects/${projectId}/addresses`)).json()) as { addresses: ApiAddress[] };
  expect(addresses.length).toBeGreaterThan(150);
  const passed = addresses.filter((a) => a.passed);
  expect(passed.length).toBeGreaterThan(0);
  expect(passed.length).toBeLessThan(addresses.length);

  await page.goto(url);
  await expect(page.getByRole('heading', { name: 'Households', level: 1 })).toBeVisible();
  await expect(tile(page, 'Addresses')).toHaveText(String(addresses.length));
  await expect(tile(page, 'Households')).toHaveText(String(addresses.reduce((s, a) => s + a.units, 0)));
  await expect(tile(page, 'Households passed')).toHaveText(String(passed.reduce((s, a) => s + a.units, 0)));
  await expect(tile(page, 'Connected')).toHaveText(String(addresses.filter((a) => a.connected).length));
  await expect(page.getByRole('link', { name: 'Import addresses' })).toBeVisible();
  await page.screenshot({ path: '/tmp/households-desktop.png', fullPage: true });
  await expect(page.getByRole('list', { name: 'Legend' })).toContainText(`passed (${passed.filter((a) => !a.connected).length})`);

  await page.getByLabel('Status', { exact: true }).selectOption('passed');
  await expect(page.getByText(`${passed.length} of ${passed.length} shown`)).toBeVisible();
  const first = page.getByRole('table', { name: 'Addresses' }).getByRole('link').first();
  const name = (await first.textContent())!;
  expect(passed.some((a) => `${a.street} ${a.number}` === name)).toBe(true);
  await first.click();
  await expect(page).toHaveURL(/\/households\/addresses\/[0-9a-f-]{36}$/);
  await expect(page.getByRole('heading', { name, level: 1 })).toBeVisible();

  const dir = mkdtempSync(path.join(os.tmpdir(), 'households-e2e-'));
  await page.goto(url);
  const [csvDownload] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Download CSV' }).click()]);
  const csvFile = path.join(dir, 'addresses.csv');
  await csvDownload.saveAs(csvFile);
  // Python's csv module reads it [computed with python3 csv]
  const csvRows = JSON.parse(execFileSync('/usr/bin/python3', ['-c', 'import csv, json, sys\nprint(json.dumps(list(csv.DictReader(open(sys.argv[1], newline="", encoding="utf-8")))))', csvFile], { encoding: 'utf8' }));
  expect(csvRows.length).toBe(addresses.length);
  expect(csvRows.filter((r: { passed: string }) => r.passed === 'true').length).toBe(passed.length);

  const [xlsxDownload] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Download Excel' }).click()]);
  const xlsxFile = path.join(dir, 'addresses.xlsx');
  await xlsxDownload.saveAs(xlsxFile);
  // openpyxl reads it [computed with python3-openpyxl]
  const got = JSON.parse(execFileSync('/usr/bin/python3', ['-c', 'import json, sys, openpyxl\nwb = openpyxl.load_workbook(sys.argv[1])\nrows = list(wb["Addresses"].iter_rows(values_only=True))\nprint(json.dumps({"n": len(rows) - 1, "passed": sum(1 for r in rows[1:] if r[5] == "yes"), "freeze": wb["Addresses"].freeze_panes}))', xlsxFile], { encoding: 'utf8' }));
  expect(got).toEqual({ n: addresses.length, passed: passed.length, freeze: 'A2' });
});

test('the owner\'s maintenance user reads the page: no import link', async ({ page }) => {
  await signIn(page, DEMO.maintenance);
  await page.goto(await householdsPath(page));
  await expect(tile(page, 'Addresses')).toBeVisible();
  await expect(page.getByRole('table', { name: 'Addresses' })).toBeVisible();
  await expect(page.getByRole('link', { name: 'Import addresses' })).toHaveCount(0);
  await expect(page.getByRole('link', { name: /Import the address register/ })).toHaveCount(0);
});

test.describe('on a phone', () => {
  test.use({ viewport: { width: 375, height: 812 }, hasTouch: true, isMobile: true });
  test('the tiles and the table fit: no sideways scrolling', async ({ page }) => {
    await signIn(page, DEMO.engineer);
    await page.goto(await householdsPath(page));
    await expect(tile(page, 'Share of the plan')).toBeVisible();
    await expect(page.getByRole('table', { name: 'Addresses' })).toBeVisible();
    const widths = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, client: document.documentElement.clientWidth }));
    expect(widths.scroll).toBeLessThanOrEqual(widths.client);
    await page.screenshot({ path: '/tmp/households-phone.png', fullPage: true });
  });
});
