import { expect, test, type Page } from '@playwright/test';
import sharp from 'sharp';
import { DEMO, signIn } from '../helpers/e2e';

const DEMO_PROJECT = 'Quillhaven North, phase 1';

async function demoProjectPath(page: Page): Promise<string> {
  await page.goto('/projects');
  return (await page.getByRole('link', { name: DEMO_PROJECT }).first().getAttribute('href'))!;
}

// a phone at the kerb
test.use({ viewport: { width: 390, height: 844 }, hasTouch: true });

test('a surveyor records a road crossing and adds a photo without GPS by giving a position', async ({ page }) => {
  await signIn(page, DEMO.surveyor);
  const base = await demoProjectPath(page);

  await page.goto(`${base}/records/crossings`);
  await expect(page.getByRole('heading', { name: 'Road crossings' })).toBeVisible();
  // the form starts on a crossing nobody has recorded yet
  const picked = await page.getByLabel('Crossing', { exact: true }).locator('option:checked').textContent();
  expect(picked).toContain('(not built yet)');
  const ref = picked!.split(' ')[0];
  const form = page.getByRole('form', { name: `Crossing ${ref}` });
  await form.getByLabel('Date built').fill('2026-11-04');
  await form.getByLabel('Measured length (m)').fill('9.1');
  await form.getByLabel('Number of ducts').fill('1');
  await form.getByLabel('Duct size').selectOption({ label: '14/10 mm' });
  await form.getByRole('button', { name: 'Record crossing' }).click();
  await expect(page.getByText(`Crossing ${ref} saved.`)).toBeVisible();
  await expect(page.getByLabel('Crossing', { exact: true }).locator('option', { hasText: ref })).toContainText('(built)');
  await expect(page.getByText(/^9\.1 m \/ \d+(\.\d)? m$/)).toBeVisible();

  await page.goto(`${base}/records/photos`);
  const upload = page.getByRole('form', { name: 'Add a photo' });
  const png = await sharp({ create: { width: 640, height: 480, channels: 3, background: '#6a6f75' } }).png().toBuffer();
  await upload.getByLabel('Photo (JPEG or PNG)').setInputFiles({ name: 'kerb.png', mimeType: 'image/png', buffer: png });
  await upload.getByLabel('Caption').fill('Kerb before sawing');
  await upload.getByRole('button', { name: 'Add photo' }).click();
  // a PNG carries no GPS position: the form asks for one, with "use my position" at hand
  await expect(upload.getByText('The photo carries no GPS position', { exact: false })).toBeVisible();
  await expect(upload.getByRole('button', { name: 'Use my position' })).toBeVisible();
  const planned = await (await page.request.get(`/api${base}/planned?format=geojson`)).json();
  const street = planned.features.find((f: { properties: { kind: string } }) => f.properties.kind === 'street');
  const [lon, lat] = street.geometry.coordinates[1] as [number, number];
  await upload.getByLabel('Longitude (°)').fill(String(lon));
  await upload.getByLabel('Latitude (°)').fill(String(lat));
  await upload.getByRole('button', { name: 'Add photo' }).click();
  await expect(upload.getByText(`Stored on ${street.properties.ref} at`, { exact: false })).toBeVisible();
  const thumb = page.getByRole('img', { name: 'Kerb before sawing' });
  await thumb.scrollIntoViewIfNeeded();
  // the thumbnail, not the original: 320 px wide for a 640 px photo
  await expect.poll(() => thumb.evaluate((img: HTMLImageElement) => img.naturalWidth)).toBe(320);
});
