import { expect, test } from '@playwright/test';
import { DEMO, signIn } from '../helpers/e2e';
import { gpxTrack } from '../helpers/upload-form';

const geojson = JSON.stringify({
  type: 'FeatureCollection',
  features: [
    { type: 'Feature', properties: { name: 'crossing 12' }, geometry: { type: 'LineString', coordinates: [[9.1101, 52.1051], [9.1102, 52.1053]] } },
    { type: 'Feature', properties: { name: 'test pit 3' }, geometry: { type: 'Point', coordinates: [9.1105, 52.1055] } },
  ],
});

async function openUploads(page: import('@playwright/test').Page) {
  await page.getByRole('link', { name: 'Quillhaven North, phase 1' }).click();
  await page.getByRole('navigation', { name: 'Project' }).getByRole('link', { name: 'Uploads' }).click();
  await expect(page.getByRole('heading', { name: 'Field uploads' })).toBeVisible();
}

async function drop(page: import('@playwright/test').Page, files: { name: string; text: string }[]) {
  const dt = await page.evaluateHandle((fs) => {
    const d = new DataTransfer();
    for (const f of fs) d.items.add(new File([f.text], f.name));
    return d;
  }, files);
  await page.dispatchEvent('[data-testid=dropzone]', 'drop', { dataTransfer: dt });
}

test('a surveyor drags two files onto the page and sees progress and the result', async ({ page }) => {
  await signIn(page, DEMO.surveyor);
  await openUploads(page);
  // remember every progress bar that appears, however briefly
  await page.evaluate(() => {
    (window as unknown as { __bars: string[] }).__bars = [];
    new MutationObserver(() => {
      for (const p of document.querySelectorAll('progress')) {
        const l = p.getAttribute('aria-label') ?? '';
        const bars = (window as unknown as { __bars: string[] }).__bars;
        if (!bars.includes(l)) bars.push(l);
      }
    }).observe(document.body, { childList: true, subtree: true });
  });
  const stamp = Date.now();
  await drop(page, [
    { name: `walk-${stamp}.gpx`, text: gpxTrack(3000, { seed: stamp % 100000 }) },
    { name: `crossings-${stamp}.geojson`, text: geojson.replace('crossing 12', `crossing ${stamp}`) },
  ]);
  const items = page.getByTestId('upload-item');
  await expect(items).toHaveCount(2);
  await expect(items.filter({ hasText: `walk-${stamp}.gpx` })).toContainText('Read 1 line or point (3,000 positions in all).', { timeout: 20_000 });
  await expect(items.filter({ hasText: `crossings-${stamp}.geojson` })).toContainText('Read 2 lines and points (3 positions in all).');
  const bars = await page.evaluate(() => (window as unknown as { __bars: string[] }).__bars);
  expect(bars).toEqual(expect.arrayContaining([`Progress of walk-${stamp}.gpx`, `Progress of crossings-${stamp}.geojson`]));

  const table = page.getByRole('table', { name: 'Uploads' });
  await expect(table).toContainText(`walk-${stamp}.gpx`);
  await table.getByRole('link', { name: `walk-${stamp}.gpx` }).click();
  await expect(page.getByRole('region', { name: 'Map of the upload' })).toBeVisible();
  await expect(page.getByText('EPSG:4326')).toBeVisible();
  await expect(page.getByRole('link', { name: `walk-${stamp}.gpx` })).toBeVisible();
});

test('a bad file shows its message next to it', async ({ page }) => {
  await signIn(page, DEMO.surveyor);
  await openUploads(page);
  await drop(page, [
    { name: 'drawing.dxf', text: '  0\r\nSECTION\r\n  2\r\nHEADER\r\n  0\r\nENDSEC\r\n  0\r\nEOF\r\n' },
    { name: 'evil.gpx', text: '<?xml version="1.0"?><!DOCTYPE gpx [<!ENTITY x SYSTEM "file:///etc/passwd">]><gpx>&x;</gpx>' },
  ]);
  const dxf = page.getByTestId('upload-item').filter({ hasText: 'drawing.dxf' });
  await expect(dxf).toContainText('refused');
  await expect(dxf).toContainText(/GPX/);
  const evil = page.getByTestId('upload-item').filter({ hasText: 'evil.gpx' });
  await expect(evil).toContainText('refused');
  await expect(evil).toContainText(/DOCTYPE|entit/i);
});

test('owners and maintenance read uploads but cannot add files', async ({ page }) => {
  await signIn(page, DEMO.owner);
  await openUploads(page);
  await expect(page.getByTestId('dropzone')).toHaveCount(0);
  await expect(page.getByRole('table', { name: 'Uploads' })).toBeVisible();
});

test('a survey CSV gets a column check with a preview, then lands once the coordinate system is named', async ({ page }) => {
  await signIn(page, DEMO.surveyor);
  await openUploads(page);
  const stamp = Date.now() % 100000;
  const csv = `Pt;E;N;H;Code\n1;507200.${stamp};5773400.00;51.20;TR\n2;507210.00;5773405.00;51.25;TR\n3;507220.00;5773410.00;51.30;TR\n`;
  await drop(page, [{ name: `rover-${stamp}.csv`, text: csv }]);
  const item = page.getByTestId('upload-item').filter({ hasText: `rover-${stamp}.csv` });
  await expect(item).toContainText('check columns');
  await expect(item.getByRole('table', { name: `Preview of rover-${stamp}.csv` })).toContainText('5773405.00');
  await page.getByLabel('Coordinate system').fill('EPSG:25832');
  await item.getByLabel('Easting').selectOption('E');
  await item.getByLabel('Northing').selectOption('N');
  await item.getByRole('button', { name: 'Upload with these columns' }).click();
  await expect(item).toContainText('stored');
  await expect(item).toContainText('3 positions');
});

test('a CSV without its grid: the columns come recognised, the refusal says so in plain words, and it is read again from the form', async ({ page }) => {
  await signIn(page, DEMO.surveyor);
  await openUploads(page);
  // the field starts with the project's grid, as a bare number
  const crs = page.getByLabel('Coordinate system', { exact: true });
  await expect(crs).toHaveValue('25832');
  await crs.fill('');
  const stamp = Date.now() % 100000;
  const csv = `pt,easting,northing\n1,507300.${stamp},5773500.00\n2,507310.00,5773505.00\n`;
  await drop(page, [{ name: `no-grid-${stamp}.csv`, text: csv }]);
  const item = page.getByTestId('upload-item').filter({ hasText: `no-grid-${stamp}.csv` });
  await expect(item).toContainText('check columns');
  await expect(item).toContainText('does not say in which grid');
  // the server recognised the columns from the header: they come pre-filled
  await expect(item.getByLabel('Point id')).toHaveValue('pt');
  await expect(item.getByLabel('Easting')).toHaveValue('easting');
  await expect(item.getByLabel('Northing')).toHaveValue('northing');
  await item.getByRole('button', { name: 'Upload with these columns' }).click();
  await expect(item).toContainText('refused');
  await expect(item).toContainText('The file does not say which coordinate system its coordinates are in.');
  await expect(item).not.toContainText('crs field');
  const retry = item.getByLabel('Coordinate system of this file (EPSG number)');
  await expect(retry).toHaveValue('25832');
  await item.getByRole('button', { name: 'Read it again' }).click();
  await expect(item).toContainText('stored');
  await expect(item).toContainText('Read 2 lines and points (2 positions in all).');
  await expect(page.getByRole('table', { name: 'Uploads' }).getByRole('row').filter({ hasText: `no-grid-${stamp}.csv` })).toContainText('EPSG:25832');
});

test('a surveyor replaces an upload with a corrected file, then withdraws the correction', async ({ page }) => {
  await signIn(page, DEMO.surveyor);
  await openUploads(page);
  const stamp = Date.now();
  await drop(page, [{ name: `first-try-${stamp}.gpx`, text: gpxTrack(40, { seed: stamp % 99991 }) }]);
  const item = page.getByTestId('upload-item').filter({ hasText: `first-try-${stamp}.gpx` });
  await expect(item).toContainText('stored');
  await page.evaluate(() => ((window as unknown as { __map?: unknown }).__map = undefined));
  await item.getByRole('link', { name: 'details' }).click();
  await expect(page.getByRole('heading', { name: `first-try-${stamp}.gpx` })).toBeVisible();
  // the map's first idle proves the page's client components are mounted, so the file input has its handler
  await page.waitForFunction(() => (window as unknown as { __map?: { loaded: boolean } }).__map?.loaded === true);
  const firstUrl = page.url();

  await page.getByLabel('Corrected file').setInputFiles({ name: `corrected-${stamp}.gpx`, mimeType: 'application/gpx+xml', buffer: Buffer.from(gpxTrack(41, { seed: stamp % 99991 })) });
  // the server may be reconciling the project at the same moment; allow it a few seconds
  await expect(page.getByRole('heading', { name: `corrected-${stamp}.gpx` })).toBeVisible({ timeout: 20_000 });
  await page.goto(firstUrl);
  await expect(page.getByText('superseded', { exact: true })).toBeVisible();
  await expect(page.getByText('Superseded by')).toBeVisible();

  await page.getByRole('link', { name: 'a corrected upload' }).click();
  await page.getByRole('button', { name: 'Withdraw' }).click();
  await page.getByRole('button', { name: 'Withdraw upload' }).click();
  await expect(page.getByText('Say why the upload is withdrawn.')).toBeVisible();
  await page.getByLabel('Why is it withdrawn?').fill('walked the wrong side of the street');
  await page.getByRole('button', { name: 'Withdraw upload' }).click();
  await expect(page.getByText('withdrawn', { exact: true })).toBeVisible();
});
