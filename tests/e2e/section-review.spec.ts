import geodesic from 'geographiclib-geodesic';
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import { expect, test, type Page } from '@playwright/test';
import { addUserWithToken, DEMO, json, signIn } from '../helpers/e2e';

// A project of its own on the project clock Europe/Berlin, seen from a browser in New York: one 150 m
// route, a handheld walk with times over its first 100 m (a 1.5 m bulge between 45 and 65 m, within the
// walk's noise) that then turns 40 m off the plan; so one as-planned, one not-built and one unplanned
// section. Positions by GeographicLib's direct problem.
const G = geodesic.Geodesic.WGS84;
const CORNER = [9.151, 52.131];
const from = (lon: number, lat: number, azi: number, s: number) => {
  const p = G.Direct(lat, lon, azi, s);
  return [p.lon2!, p.lat2!];
};
const east = (s: number, left = 0) => {
  const [lon, lat] = from(CORNER[0], CORNER[1], 90, s);
  return left ? from(lon, lat, 0, left) : [lon, lat];
};
const SHOTS = process.env.SHOTS_DIR ?? path.resolve(__dirname, '../../.data/e2e-shots');
mkdirSync(SHOTS, { recursive: true });

test.use({ timezoneId: 'America/New_York' });

let projectId: string;
let walkId: string;

function walkGpx(): string {
  const pts: number[][] = [];
  for (let s = 0; s <= 100; s += 1.3) pts.push(east(s, s > 45 && s < 65 ? 1.5 : 0));
  const turn = east(100);
  for (let s = 1.3; s <= 40; s += 1.3) pts.push(from(turn[0], turn[1], 180, s));
  // fix i at 09:00:00 + i s UTC on 12 November 2026: 10:00:00 + i s in Berlin (CET), 04:00:00 in New York
  const trk = pts.map(([lon, lat], i) => `<trkpt lat="${lat.toFixed(8)}" lon="${lon.toFixed(8)}"><time>${new Date(Date.UTC(2026, 10, 12, 9, 0, i)).toISOString()}</time></trkpt>`);
  return `<?xml version="1.0"?><gpx version="1.1" creator="e2e" xmlns="http://www.topografix.com/GPX/1/1"><trk><trkseg>${trk.join('')}</trkseg></trk></gpx>`;
}

test.beforeAll(async ({ request }) => {
  const admin = addUserWithToken({ email: DEMO.contractorAdmin, name: 'Ilse Marrowby', role: 'admin', org: 'Tarnwick Slot & Duct Ltd', orgKind: 'contractor' });
  const engineer = addUserWithToken({ email: DEMO.engineer, name: 'Osric Fennimore', role: 'engineer', org: 'Tarnwick Slot & Duct Ltd', orgKind: 'contractor' });
  const p = await json<{ project: { id: string } }>(request, 'POST', '/api/projects', admin, { name: `Tallow Lane ${Date.now()}`, partnerOrganisation: 'Quillhaven Open Fibre', timeZone: 'Europe/Berlin' });
  expect(p.status).toBe(201);
  projectId = p.body!.project.id;
  const design = { type: 'Feature', properties: { route_id: 'TL-1', street: 'Tallow Lane' }, geometry: { type: 'LineString', coordinates: [east(0), east(150)] } };
  expect((await json(request, 'POST', `/api/projects/${projectId}/planned`, engineer, { multipart: { file: { name: 'tallow.geojson', mimeType: 'application/geo+json', buffer: Buffer.from(JSON.stringify(design)) } } })).status).toBe(201);
  const up = await json<{ upload: { id: string } }>(request, 'POST', `/api/projects/${projectId}/uploads`, engineer, { multipart: { file: { name: 'tallow-walk.gpx', mimeType: 'application/gpx+xml', buffer: Buffer.from(walkGpx()) }, accuracy: 'handheld_gnss', surveyDate: '2026-11-12' } });
  expect(up.status).toBe(201);
  walkId = up.body!.upload.id;
  const job = await json<{ job: { id: string } }>(request, 'POST', `/api/projects/${projectId}/reconcile`, engineer);
  await expect.poll(async () => (await json<{ job: { status: string } }>(request, 'GET', `/api/jobs/${job.body!.job.id}`, engineer)).body!.job.status, { timeout: 30_000 }).toBe('completed');
});

const mapReady = (page: Page) => page.waitForFunction(() => (window as unknown as { __map?: { loaded: boolean } }).__map?.loaded === true);

test('an engineer sees dashes where nothing was measured, one colour per status, and settles every section', async ({ page }) => {
  await signIn(page, DEMO.engineer);
  await page.goto(`/projects/${projectId}/reconciliation`);
  const table = page.getByRole('table', { name: 'Sections' });
  const gap = table.getByRole('row').filter({ hasText: 'not built' });
  const loose = table.getByRole('row').filter({ hasText: 'unplanned' });
  await expect(gap).toHaveCount(1);
  // no 0.00 m where nothing measured: a not-built stretch has no offset and no accuracy, an unplanned line no offset
  await expect(gap.getByRole('cell', { name: /^0\.00?( m)?$/ })).toHaveCount(0);
  await expect(gap.getByRole('cell', { name: '—', exact: true })).toHaveCount(4);
  await expect(loose.getByRole('cell', { name: '—', exact: true })).toHaveCount(2);
  // the status badge wears the same colour as the legend (and the map layer drawn from the same source)
  for (const label of ['as planned', 'not built', 'unplanned']) {
    const badge = await table.getByRole('row').filter({ hasText: label }).first().locator('[data-swatch]').first().getAttribute('data-swatch');
    const legend = await page.getByRole('list', { name: 'Legend' }).getByRole('listitem').filter({ hasText: label }).locator('[data-swatch]').getAttribute('data-swatch');
    expect(badge, label).toBe(legend);
  }
  await mapReady(page);
  await page.screenshot({ path: path.join(SHOTS, 'reconciliation-desktop-before.png'), fullPage: true });

  // approve every as-planned section shown at once: nothing is recorded in its trench yet (no depth reading,
  // no duct bundle), so its quality checks are open and the approval needs a comment saying why
  await expect(table.getByRole('row').filter({ hasText: 'as planned' })).toContainText(/\d+ open/);
  await page.getByRole('button', { name: /^Approve (it|all \d+)$/ }).click();
  const bulkComment = page.getByRole('group', { name: 'Review the picked sections' }).getByLabel(/Comment/);
  await expect(page.getByText(/sections have open quality checks: say why you approve them/)).toBeVisible();
  await bulkComment.fill('records follow with the next upload; position checked on site');
  await page.getByRole('button', { name: /^Approve (it|all \d+)$/ }).click();
  await expect(page.getByText('1 section approved.')).toBeVisible();
  await expect(table.getByRole('row').filter({ hasText: 'as planned' })).toContainText('approved');

  // a not-built stretch is acknowledged with the reason, not approved
  await gap.getByRole('checkbox').check();
  const bulk = page.getByRole('group', { name: 'Review the picked sections' });
  await expect(bulk.getByRole('button', { name: 'Approve' })).toBeDisabled();
  await bulk.getByRole('button', { name: 'Acknowledge not built' }).click();
  await expect(bulk.getByText('Say why: a rejection or an acknowledged not-built stretch needs a reason.')).toBeVisible();
  await bulk.getByLabel(/Comment/).fill('the last 50 m go in with phase 2');
  await bulk.getByRole('button', { name: 'Acknowledge not built' }).click();
  await expect(page.getByText('1 section acknowledged as not built.')).toBeVisible();
  await expect(gap).toContainText('acknowledged');
  await expect(page.getByLabel('Review progress')).toContainText(/2 of \d+ sections settled/);

  // the rest (the unplanned line, and whatever the turn at 100 m made of the route's end) approved together
  const rows = table.getByRole('row').filter({ has: page.getByRole('checkbox', { name: /^Select (?!every)/ }) });
  const total = await rows.count();
  for (let i = 0; i < total; i++) {
    const row = rows.nth(i);
    if (!/approved|acknowledged/.test(await row.innerText())) await row.getByRole('checkbox').check();
  }
  await bulk.getByLabel(/Comment/).fill('checked on site; records follow');
  await bulk.getByRole('button', { name: 'Approve' }).click();
  await expect(page.getByText(`Fully approved: all ${total} sections are settled (${total - 1} approved, 1 acknowledged as not built).`)).toBeVisible();
  await page.screenshot({ path: path.join(SHOTS, 'reconciliation-desktop-approved.png'), fullPage: true });

  // the CSV download is a zip: the table and its README with the caution
  const res = await page.request.get((await page.getByRole('link', { name: 'Download CSV (zip)' }).getAttribute('href'))!);
  expect(res.headers()['content-type']).toContain('application/zip');
  expect((await res.body()).subarray(0, 2).toString('latin1')).toBe('PK');
});

test('the section page explains an offset beyond the tolerance that the noise swamps, and when the stretch was walked', async ({ page }) => {
  await signIn(page, DEMO.engineer);
  await page.goto(`/projects/${projectId}/reconciliation`);
  await page.getByRole('table', { name: 'Sections' }).getByRole('row').filter({ hasText: 'as planned' }).getByRole('link', { name: 'TL-1' }).click();
  await expect(page.getByText('Why this stretch is not flagged as deviating.')).toBeVisible();
  await expect(page.getByText(/tallow-walk\.gpx \(typical error [\d.]+ m each way, 95 % radius [\d.]+ m\)/)).toBeVisible();
  // the band's edges are labelled on the plot
  await expect(page.getByText('+0.5 m tolerance')).toBeVisible();
  // walked 10:00–10:01 on the project's clock (Berlin), whatever the browser's (New York: 04:00)
  const sources = page.getByRole('table', { name: 'Source uploads' });
  await expect(sources.getByRole('link', { name: /^2026-11-12 10:0\d:\d\d – 10:0\d:\d\d$/ })).toBeVisible();
  await mapReady(page);
  await page.screenshot({ path: path.join(SHOTS, 'section-desktop.png'), fullPage: true });
  // the stretch's times go to the upload's form, on the same clock
  await sources.getByRole('link', { name: /^2026-11-12 10:00:00 – / }).click();
  await expect(page.getByRole('form', { name: 'Leave a stretch out of matching' }).getByLabel(/^From/)).toHaveValue('2026-11-12 10:00:00');

  await page.goto(`/projects/${projectId}/reconciliation`);
  await page.getByRole('table', { name: 'Sections' }).getByRole('row').filter({ hasText: 'not built' }).getByRole('link', { name: 'TL-1' }).click();
  await expect(page.getByText('Max / 95th-percentile offset').locator('..')).toContainText('—');
  await expect(page.getByText('Position accuracy (95 % radius)').locator('..')).toContainText('—');
  await expect(page.getByRole('button', { name: 'Acknowledge not built' })).toBeVisible();
  await mapReady(page);
  await page.screenshot({ path: path.join(SHOTS, 'section-not-built-desktop.png'), fullPage: true });
});

test('an engineer picks a stretch on the trace map, on the project clock, and takes it back in', async ({ page }) => {
  await signIn(page, DEMO.engineer);
  await page.goto(`/projects/${projectId}/uploads/${walkId}`);
  await expect(page.getByText(/from 2026-11-12 10:00:00 to 2026-11-12 10:01:46 \(Europe\/Berlin\)/)).toBeVisible();
  await expect(page.getByRole('list', { name: 'Times along the trace' })).toContainText('2026-11-12 10:00:00 at 0 m');

  // a range with no fix is refused, saying when the fixes are
  const form = page.getByRole('form', { name: 'Leave a stretch out of matching' });
  await form.getByLabel(/^From/).fill('2026-11-12 04:00:00');
  await form.getByLabel(/^To/).fill('2026-11-12 04:01:00');
  await form.getByLabel('Why').fill('typed on the browser clock');
  await form.getByRole('button', { name: 'Leave out' }).click();
  await expect(form.getByText(/No fix of this upload falls between 2026-11-12 04:00:00 and 2026-11-12 04:01:00 \(Europe\/Berlin\); its fixes run from 2026-11-12 10:00:00 to 2026-11-12 10:01:46\./)).toBeVisible();

  // two clicks on the map: fix 20 and fix 60 (10:00:20 and 10:01:00 in Berlin)
  const map = page.getByRole('region', { name: /Map of the upload's fixes/ });
  await expect(map).toHaveAttribute('aria-busy', 'false', { timeout: 20_000 });
  const pixel = (i: number) => page.evaluate((k) => (window as unknown as { __tracePicker: { pixelOf: (i: number) => { x: number; y: number } } }).__tracePicker.pixelOf(k), i);
  for (const i of [20, 60]) {
    const p = await pixel(i);
    await map.click({ position: { x: p.x, y: p.y } });
  }
  await expect(form.getByLabel(/^From/)).toHaveValue('2026-11-12 10:00:20');
  await expect(form.getByLabel(/^To/)).toHaveValue('2026-11-12 10:01:00');
  await expect(form.getByText(/^\d+ of the \d+ fixes on the map fall in this range\.$/)).toBeVisible();
  await form.getByLabel('Why').fill('walked back to the van');
  await page.screenshot({ path: path.join(SHOTS, 'upload-desktop-picked.png'), fullPage: true });
  await form.getByRole('button', { name: 'Leave out' }).click();
  await expect(page.getByText('41 fixes left out of matching; the project is being reconciled again.')).toBeVisible();
  const ranges = page.getByRole('list', { name: 'Stretches left out of matching' });
  await expect(ranges).toContainText('2026-11-12 10:00:20 to 2026-11-12 10:01:00: walked back to the van (41 fixes;');
  await ranges.getByRole('button', { name: 'Take back in' }).click();
  await expect(ranges).toHaveCount(0);
});

test('on a phone the reconciliation and upload pages fit the screen', async ({ page }) => {
  await page.setViewportSize({ width: 390, height: 844 });
  await signIn(page, DEMO.engineer);
  await page.goto(`/projects/${projectId}/reconciliation`);
  await expect(page.getByRole('table', { name: 'Sections' })).toBeVisible();
  await mapReady(page);
  await page.screenshot({ path: path.join(SHOTS, 'reconciliation-phone.png'), fullPage: true });
  await page.goto(`/projects/${projectId}/uploads/${walkId}`);
  await expect(page.getByRole('region', { name: /Map of the upload's fixes/ })).toHaveAttribute('aria-busy', 'false', { timeout: 20_000 });
  await page.screenshot({ path: path.join(SHOTS, 'upload-phone.png'), fullPage: true });
  // nothing wider than the screen
  expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
});
