import { expect, test, type Page } from '@playwright/test';
// Named field-*: it runs before the isolation matrix, which reviews, splits and re-plans the demo's sections.
import { DEMO, signIn } from '../helpers/e2e';

const DEMO_PROJECT = 'Quillhaven North, phase 1';

async function demoProjectPath(page: Page): Promise<string> {
  await page.goto('/projects');
  return (await page.getByRole('link', { name: DEMO_PROJECT }).first().getAttribute('href'))!;
}

// a phone at the kerb
test.use({ viewport: { width: 390, height: 844 }, hasTouch: true });

test('a surveyor records a restoration with a cold reading and corrects a day\'s figure with a reason', async ({ page }) => {
  await signIn(page, DEMO.surveyor);
  const base = await demoProjectPath(page);

  await page.goto(`${base}/records/restoration`);
  await expect(page.getByRole('heading', { name: 'Surface restoration' })).toBeVisible();
  // where laying temperatures are shown, the hot-bitumen caution is too
  await expect(page.locator('[data-caution="hotBitumen"]')).toBeVisible();
  const form = page.getByRole('form', { name: 'Record a restoration' });
  const route = await form.getByLabel('Route').locator('option', { hasText: 'QN-104' }).textContent();
  await form.getByLabel('Route').selectOption({ label: route! });
  await form.getByLabel('From chainage (m)').fill('0');
  await form.getByLabel('To chainage (m)').fill('40');
  await form.getByLabel('Date and time of the restoration').fill('2026-11-06T10:00');
  await form.getByLabel('Edges cleaned at').fill('2026-11-06T09:10');
  await form.getByLabel('Surface laid at').fill('2026-11-06T09:40');
  await form.getByLabel('Laid surface thickness (mm)').fill('40');
  await form.getByRole('button', { name: 'Add a temperature reading' }).click();
  await form.getByLabel('Reading 1 (°C)').fill('196');
  await form.getByRole('button', { name: 'Add a temperature reading' }).click();
  await form.getByLabel('Reading 2 (°C)').fill('150');
  await form.getByLabel('Crew').fill('Crew 2');
  await form.getByRole('button', { name: 'Save restoration' }).click();
  await expect(page.getByText('Restoration saved.')).toBeVisible();
  await expect(page.getByText('Laying temperature 150 °C outside 180–210 °C.')).toBeVisible();

  await page.goto(`${base}/records/production`);
  await expect(page.getByRole('heading', { name: 'Daily production' })).toBeVisible();
  const correct = page.getByRole('form', { name: 'Correct a figure' });
  await correct.getByLabel('Day').fill('2026-11-06');
  await correct.getByLabel('Crew').fill('Crew 2');
  await correct.getByLabel('What').selectOption({ label: 'Pits dug' });
  await correct.getByLabel('Corrected count').fill('2');
  await correct.getByRole('button', { name: 'Save correction' }).click();
  // no reason: refused next to the field, nothing sent
  await expect(correct.getByText('Say why the figure is corrected.')).toBeVisible();
  await correct.getByLabel('Reason (required)').fill('Two pits entered on paper only');
  await correct.getByRole('button', { name: 'Save correction' }).click();
  await expect(page.getByText('Correction saved.')).toBeVisible();
  // the shown figure with the derived one and the reason beside it
  await expect(page.getByText('2 (corrected; derived —: Two pits entered on paper only)')).toBeVisible();
  // the restoration of the 6th counts as restored metres for Crew 2
  await expect(page.getByText('40.0 m').first()).toBeVisible();
});
