import { expect, test } from '@playwright/test';
import { DEMO, signIn } from '../helpers/e2e';

test('an engineer reconciles the project and reads planned against built', async ({ page }) => {
  await signIn(page, DEMO.engineer);
  await page.getByRole('link', { name: 'Quillhaven North, phase 1' }).click();
  await page.getByRole('navigation', { name: 'Project' }).getByRole('link', { name: 'Planned against built' }).click();
  await expect(page.getByRole('heading', { name: 'Planned against built' })).toBeVisible();
  await page.getByRole('button', { name: 'Reconcile now' }).click();
  await expect(page.getByText(/Run \d+: \d+ sections/)).toBeVisible({ timeout: 30_000 });
  await page.reload();
  const table = page.getByRole('table', { name: 'Sections' });
  await expect(table.getByRole('row')).not.toHaveCount(1);
  await expect(table).toContainText(/as planned|deviates|not built|unplanned/);
  await expect(page.getByText(/built of .* planned/)).toBeVisible();
  await page.waitForFunction(() => (window as unknown as { __map?: { loaded: boolean } }).__map?.loaded === true);

  for (const [name, type, magic] of [['Download CSV (zip)', 'application/zip', 'PK'], ['Download Excel', 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', 'PK']] as const) {
    const res = await page.request.get((await page.getByRole('link', { name }).getAttribute('href'))!);
    expect(res.status()).toBe(200);
    expect(res.headers()['content-type']).toContain(type);
    expect((await res.body()).subarray(0, magic.length).toString('latin1')).toBe(magic);
  }

  // review: pick a section in the table; a rejection needs a reason
  await table.getByRole('checkbox', { name: /^Select (?!every)/ }).first().check();
  const bulk = page.getByRole('group', { name: 'Review the picked sections' });
  await bulk.getByRole('button', { name: 'Reject' }).click();
  await expect(bulk.getByText('Say why: a rejection or an acknowledged not-built stretch needs a reason.')).toBeVisible();
  await bulk.getByLabel(/Comment/).fill('photos show the slot on the other side');
  await bulk.getByRole('button', { name: 'Reject' }).click();
  await expect(page.getByText('1 section rejected.')).toBeVisible();
  await expect(table).toContainText('rejected');
});

test('a network owner reads the reconciliation but cannot run or review it', async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.getByRole('link', { name: 'Quillhaven North, phase 1' }).click();
  await page.getByRole('navigation', { name: 'Project' }).getByRole('link', { name: 'Planned against built' }).click();
  await expect(page.getByRole('table', { name: 'Sections' })).toBeVisible();
  await expect(page.getByRole('button', { name: 'Reconcile now' })).toHaveCount(0);
  await expect(page.getByRole('button', { name: 'Approve' })).toHaveCount(0);
});
