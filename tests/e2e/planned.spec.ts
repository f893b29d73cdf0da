import { expect, test } from '@playwright/test';
import { DEMO, signIn } from '../helpers/e2e';

const design = JSON.stringify({
  type: 'FeatureCollection',
  features: [
    { type: 'Feature', properties: { route_id: 'QN-101', street: 'Lanternfield Road', bundle: '12x7mm', type: 'street' }, geometry: { type: 'LineString', coordinates: [[9.1040, 52.1060], [9.1060, 52.1060], [9.1080, 52.1061]] } },
    { type: 'Feature', properties: { route_id: 'QN-102', street: 'Cobbler Walk', bundle: '7x7mm', type: 'street' }, geometry: { type: 'LineString', coordinates: [[9.1060, 52.1060], [9.1060, 52.1072]] } },
    { type: 'Feature', properties: { route_id: 'QN-X1', street: 'Lanternfield Road', bundle: '1x14mm', type: 'road crossing' }, geometry: { type: 'LineString', coordinates: [[9.1050, 52.1060], [9.1050, 52.10592]] } },
  ],
});

test('an engineer imports the design and sees it on the map and in the table', async ({ page }) => {
  await signIn(page, DEMO.engineer);
  await page.getByRole('link', { name: 'Quillhaven North, phase 1' }).click();
  await page.getByRole('link', { name: 'Planned network' }).click();
  await page.getByLabel('Design file').setInputFiles({ name: 'quillhaven-north.geojson', mimeType: 'application/geo+json', buffer: Buffer.from(design) });
  await page.getByRole('button', { name: 'Import' }).click();
  await expect(page.getByRole('status').filter({ hasText: /Version \d+: 3 routes/ })).toBeVisible();
  const table = page.getByRole('table', { name: 'Planned routes' });
  await expect(table).toContainText('QN-101');
  await expect(table).toContainText('road crossing');
  await expect(table).toContainText('Cobbler Walk');
  await expect(page.getByRole('region', { name: 'Map of the planned network' })).toBeVisible();
  await page.waitForFunction(() => (window as unknown as { __map?: { loaded: boolean } }).__map?.loaded === true);
});

test('a surveyor reads the plan but has no import form', async ({ page }) => {
  await signIn(page, DEMO.surveyor);
  await page.getByRole('link', { name: 'Quillhaven North, phase 1' }).click();
  await page.getByRole('link', { name: 'Planned network' }).click();
  await expect(page.getByRole('heading', { name: 'Planned network' })).toBeVisible();
  await expect(page.getByLabel('Design file')).toHaveCount(0);
});
