import { expect, test, type Page } from '@playwright/test';
// Named field-*: it runs before the isolation matrix, which reviews, splits and re-plans the demo's sections.
import { DEMO, signIn } from '../helpers/e2e';

// Issue 14's end-to-end case, on a phone at the kerb: a surveyor records a duct bundle and two depth readings
// (one below the project's minimum cover of 0.40 m) through the forms, the second while the connection is
// down (kept as a draft on the phone, sent when it is back); the engineer then sees the cover check on the
// section's page and can approve only with a comment.
test.use({ viewport: { width: 390, height: 844 }, hasTouch: true, isMobile: true });

const DEMO_PROJECT = 'Quillhaven North, phase 1';

interface SectionRow {
  id: string;
  plannedRouteRef: string | null;
  status: string;
  review: string;
  fromChainageM: number;
  toChainageM: number;
}

async function demoProjectPath(page: Page): Promise<string> {
  await page.goto('/projects');
  return (await page.getByRole('link', { name: DEMO_PROJECT }).first().getAttribute('href'))!;
}

async function pickRoute(form: ReturnType<Page['getByRole']>, ref: string) {
  const route = form.getByLabel('Route', { exact: true });
  await route.selectOption((await route.locator('option', { hasText: ref }).getAttribute('value'))!);
}

test('a surveyor records a bundle and two depths on a phone; the engineer must comment to approve the section with the cover check', async ({ page }) => {
  await signIn(page, DEMO.surveyor);
  const base = await demoProjectPath(page);
  const { sections } = (await (await page.request.get(`/api${base}/sections`)).json()) as { sections: SectionRow[] };
  // a built, pending stretch of Wickham Rise long enough for a 12 m bundle past the first 45 m (other specs
  // record short bundles nearer its start)
  const target = sections.find((s) => s.plannedRouteRef === 'QN-104' && s.status !== 'not_built' && s.review === 'pending' && s.toChainageM - Math.max(s.fromChainageM, 45) > 14)!;
  expect(target, 'a built QN-104 section in the demo').toBeTruthy();
  const from = Math.ceil(Math.max(target.fromChainageM, 45));

  // the duct bundle, filled from the plan's 4 × 7 mm
  await page.goto(`${base}/records/ducts`);
  const bundle = page.getByRole('form', { name: 'Record an installed bundle' });
  await pickRoute(bundle, 'QN-104');
  await bundle.getByLabel('From chainage (m)').fill(String(from));
  await bundle.getByLabel('To chainage (m)').fill(String(from + 12));
  await bundle.getByRole('button', { name: /^Fill from the plan/ }).click();
  await expect(bundle.getByRole('group', { name: 'Duct 4' })).toBeVisible();
  await bundle.getByRole('button', { name: 'Save bundle' }).click();
  await expect(bundle.getByText('Bundle saved.')).toBeVisible();

  // two depth readings by route and chainage: 0.52 m, then 0.25 m (below the demo's minimum of 0.40 m)
  await page.goto(`${base}/records/depths`);
  const depth = page.getByRole('form', { name: 'Add a depth reading' });
  await expect(depth.getByRole('button', { name: 'Use my position' })).toBeVisible();
  await depth.getByRole('button', { name: 'Route and chainage' }).click();
  await pickRoute(depth, 'QN-104');
  await depth.getByLabel('Chainage (m)').fill(String(from + 3));
  await depth.getByLabel('Cover (m)').fill('0.52');
  await depth.getByRole('button', { name: 'Save reading' }).click();
  await expect(depth.getByText('Reading saved.')).toBeVisible();

  // the second one while the phone has no connection: kept on the device, sent when the connection is back
  await pickRoute(depth, 'QN-104');
  await depth.getByLabel('Chainage (m)').fill(String(from + 8));
  await depth.getByLabel('Cover (m)').fill('0.25');
  await page.context().setOffline(true);
  await depth.getByRole('button', { name: 'Save reading' }).click();
  await expect(depth.getByText(/No connection: the record is kept on this device/)).toBeVisible();
  const draft = await page.evaluate(() => Object.entries(localStorage).filter(([k]) => k.startsWith('trenchbook:draft:')).map(([, v]) => v).join(''));
  expect(draft).toContain('0.25');
  await page.context().setOffline(false);
  await expect(depth.getByText('Reading saved.')).toBeVisible({ timeout: 15_000 });
  expect(await page.evaluate(() => Object.keys(localStorage).filter((k) => k.startsWith('trenchbook:draft:depth')).length)).toBe(0);

  // the engineer sees the check beside the approve button
  await page.context().clearCookies();
  await signIn(page, DEMO.engineer);
  await page.goto(`${base}/sections/${target.id}`);
  const checks = page.getByRole('list', { name: 'Open quality checks' });
  await expect(checks).toContainText('Cover below the minimum');
  await expect(checks).toContainText('0.25');
  await expect(page.getByRole('region', { name: 'Depth readings on this stretch' })).toContainText('below minimum');
  await page.getByRole('button', { name: 'Approve' }).click();
  await expect(page.getByText(/open quality checks? \(.*cover below the minimum.*\): confirm the approval with a comment/)).toBeVisible();
  await expect(page.getByText('Approved.')).toHaveCount(0);
  await page.getByLabel(/Comment \(required: \d+ open quality checks?\)/).fill('0.25 m at one spot agreed with the road authority; slab over the ducts');
  await page.getByRole('button', { name: 'Approve' }).click();
  await expect(page.getByText('Approved.')).toBeVisible();

  // the quality-checks page lists it too, with a link to the reading's page
  await page.goto(`${base}/checks`);
  await expect(page.getByRole('list', { name: 'Cover below the minimum' })).toContainText('0.25');
});
