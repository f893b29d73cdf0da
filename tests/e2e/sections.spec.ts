import geodesic from 'geographiclib-geodesic';
import { expect, test } from '@playwright/test';
import { addUserWithToken, DEMO, json, signIn } from '../helpers/e2e';

// A project of its own: one 150 m route, RTK points over its first 100 m, so it has one built and one
// not-built section. Positions by GeographicLib's direct problem.
const G = geodesic.Geodesic.WGS84;
const CORNER = [9.121, 52.111];
const east = (s: number) => {
  const p = G.Direct(CORNER[1], CORNER[0], 90, s);
  return [p.lon2!, p.lat2!];
};

let projectId: string;

test.beforeAll(async ({ request }) => {
  const admin = addUserWithToken({ email: DEMO.contractorAdmin, name: 'Ilse Marrowby', role: 'admin', org: 'Tarnwick Slot & Duct Ltd', orgKind: 'contractor' });
  const engineer = addUserWithToken({ email: DEMO.engineer, name: 'Osric Fennimore', role: 'engineer', org: 'Tarnwick Slot & Duct Ltd', orgKind: 'contractor' });
  const p = await json<{ project: { id: string } }>(request, 'POST', '/api/projects', admin, { name: `Wickham Row ${Date.now()}`, partnerOrganisation: 'Quillhaven Open Fibre' });
  expect(p.status).toBe(201);
  projectId = p.body!.project.id;
  const design = { type: 'Feature', properties: { route_id: 'WR-1', street: 'Wickham Row' }, geometry: { type: 'LineString', coordinates: [east(0), east(150)] } };
  const plan = await json(request, 'POST', `/api/projects/${projectId}/planned`, engineer, { multipart: { file: { name: 'wickham.geojson', mimeType: 'application/geo+json', buffer: Buffer.from(JSON.stringify(design)) } } });
  expect(plan.status).toBe(201);
  const csv = ['id,lat,lon', ...Array.from({ length: 51 }, (_, i) => { const [lon, lat] = east(2 * i); return `${i + 1},${lat.toFixed(9)},${lon.toFixed(9)}`; })].join('\n');
  const up = await json(request, 'POST', `/api/projects/${projectId}/uploads`, engineer, { multipart: { file: { name: 'wickham-rtk.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) }, accuracy: 'rtk_gnss', surveyDate: '2026-11-12' } });
  expect(up.status).toBe(201);
  const job = await json<{ job: { id: string } }>(request, 'POST', `/api/projects/${projectId}/reconcile`, engineer);
  await expect.poll(async () => (await json<{ job: { status: string } }>(request, 'GET', `/api/jobs/${job.body!.job.id}`, engineer)).body!.job.status, { timeout: 30_000 }).toBe('completed');
});

test('an engineer opens a section, sees its plot and sources, and splits it at a chainage', async ({ page }) => {
  await signIn(page, DEMO.engineer);
  await page.goto(`/projects/${projectId}/reconciliation`);
  const table = page.getByRole('table', { name: 'Sections' });
  await table.getByRole('row').filter({ hasText: 'as planned' }).getByRole('link', { name: 'WR-1' }).click();
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(/^WR-1, 0\.0–10\d\.\d m$/);
  await expect(page.getByRole('img', { name: /Offset from the plan against chainage\. 51 matched observations from 1 upload/ })).toBeVisible();
  await expect(page.getByRole('table', { name: 'Source uploads' })).toContainText('wickham-rtk.csv');
  await page.waitForFunction(() => (window as unknown as { __map?: { loaded: boolean } }).__map?.loaded === true);

  await page.getByLabel('Split at chainage (m)').fill('50');
  await page.getByRole('button', { name: 'Record correction' }).click();
  await expect(page.getByText('Say why: the reason goes into the audit log.')).toBeVisible();
  await page.getByLabel('Reason (goes into the audit log)').fill('two reinstatement days');
  await page.getByRole('button', { name: 'Record correction' }).click();
  // the run keeps this id for the first half; the page follows it
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('WR-1, 0.0–50.0 m', { timeout: 30_000 });
  await expect(page.getByRole('list', { name: 'Corrections of this stretch' })).toContainText('split at 50.0 m: “two reinstatement days”');
});

test('an engineer gives the reason a stretch is not built, then withdraws it', async ({ page }) => {
  await signIn(page, DEMO.engineer);
  await page.goto(`/projects/${projectId}/reconciliation`);
  await page.getByRole('table', { name: 'Sections' }).getByRole('row').filter({ hasText: 'not built' }).getByRole('link', { name: 'WR-1' }).click();
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(/^WR-1, 10\d\.\d–150\.0 m$/);
  await expect(page.getByLabel('Correction')).toHaveValue('not_built_reason');
  await page.getByLabel('Reason (goes into the audit log)').fill('skip lorry parked over the verge');
  await page.getByRole('button', { name: 'Record correction' }).click();
  const list = page.getByRole('list', { name: 'Corrections of this stretch' });
  await expect(list).toContainText('reason for not built', { timeout: 30_000 });
  await expect(page.getByText('skip lorry parked over the verge').first()).toBeVisible();
  await list.getByRole('button', { name: /Withdraw correction/ }).click();
  await expect(list).toContainText('withdrawn', { timeout: 30_000 });
});

test('an owner reads a section but has no review or correction forms', async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.goto(`/projects/${projectId}/reconciliation`);
  await page.getByRole('table', { name: 'Sections' }).getByRole('link', { name: 'WR-1' }).first().click();
  await expect(page.getByRole('heading', { name: 'The record' })).toBeVisible();
  await expect(page.getByRole('button', { name: 'Record correction' })).toHaveCount(0);
  await expect(page.getByRole('button', { name: 'Approve' })).toHaveCount(0);
});
