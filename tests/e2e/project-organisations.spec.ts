import { expect, test } from '@playwright/test';
import { addUserWithToken, DEMO, json, signIn } from '../helpers/e2e';

// A project of its own between the demo owner and contractor, and a second owner to hand it to.
let projectId: string;
let projectName: string;
let contractorToken: string;
let ownerToken: string;

test.beforeAll(async ({ request }) => {
  contractorToken = addUserWithToken({ email: DEMO.contractorAdmin, name: 'Ilse Marrowby', role: 'admin', org: 'Tarnwick Slot & Duct Ltd', orgKind: 'contractor' });
  ownerToken = addUserWithToken({ email: DEMO.admin, name: 'Maren Oakfield', role: 'admin', org: 'Quillhaven Open Fibre', orgKind: 'owner' });
  const reg = await json(request, 'POST', '/api/organisations', contractorToken, { name: 'Fernbrook Fibre Trust', kind: 'owner' });
  expect([201, 409]).toContain(reg.status);
  projectName = `Lindqvist Close ${Date.now()}`;
  const p = await json<{ project: { id: string } }>(request, 'POST', '/api/projects', contractorToken, { name: projectName, partnerOrganisation: 'Quillhaven Open Fibre', defaultCrs: '25832' });
  expect(p.status).toBe(201);
  projectId = p.body!.project.id;
});

test('a typed owner name cannot move the project, and no organisation is made from it', async ({ request, page }) => {
  const typo = await json<{ error: { code: string; details: { path: string }[] } }>(request, 'PATCH', `/api/projects/${projectId}`, contractorToken, { partnerOrganisation: 'Quillhavn Open Fibre' });
  expect(typo.status).toBe(422);
  expect(typo.body!.error.details[0].path).toBe('partnerOrganisation');
  const project = await json<{ project: { ownerOrgName: string } }>(request, 'GET', `/api/projects/${projectId}`, ownerToken);
  expect(project.body!.project.ownerOrgName).toBe('Quillhaven Open Fibre');
  const orgs = await json<{ organisations: { name: string }[] }>(request, 'GET', '/api/organisations', contractorToken);
  expect(orgs.body!.organisations.map((o) => o.name)).not.toContain('Quillhavn Open Fibre');

  // and the settings screen has no field to type an owner into
  await signIn(page, DEMO.contractorAdmin);
  await page.goto(`/projects/${projectId}/settings`);
  await expect(page.getByRole('heading', { name: 'Project settings' })).toBeVisible();
  await expect(page.getByRole('textbox', { name: /network owner/i })).toHaveCount(0);
});

test('the contractor proposes a new owner; it moves only when the current owner confirms', async ({ page, browser }) => {
  await signIn(page, DEMO.contractorAdmin);
  await page.goto(`/projects/${projectId}/settings`);
  const panel = page.getByRole('form', { name: 'Propose a change' });
  await panel.getByLabel('What changes').selectOption('owner');
  await panel.getByLabel('New network owner').selectOption({ label: 'Fernbrook Fibre Trust' });
  await panel.getByLabel('Reason').fill('The network in Lindqvist Close was sold to Fernbrook.');
  await panel.getByRole('button', { name: 'Propose the change' }).click();
  await expect(page.getByText('Proposed. An admin of Quillhaven Open Fibre must confirm it before anything changes.')).toBeVisible();
  const proposal = page.getByRole('region', { name: 'Proposed change' });
  await expect(proposal).toContainText('from Quillhaven Open Fibre to Fernbrook Fibre Trust');
  await expect(proposal).toContainText('Waiting for an admin of Quillhaven Open Fibre to confirm or decline.');
  await expect(proposal.getByRole('button', { name: /^Confirm/ })).toHaveCount(0);

  // the owner's side sees the proposal on the project page and answers it in the settings
  const ownerContext = await browser.newContext();
  const owner = await ownerContext.newPage();
  await signIn(owner, DEMO.admin);
  await owner.goto(`/projects/${projectId}`);
  await expect(owner.getByText(/Tarnwick Slot & Duct Ltd proposed to change the network owner from Quillhaven Open Fibre to Fernbrook Fibre Trust/)).toBeVisible();
  await owner.getByRole('link', { name: 'the settings' }).click();
  await owner.getByRole('button', { name: 'Confirm: Fernbrook Fibre Trust becomes the network owner' }).click();
  // the old owner handed the project on, so it is no longer among its projects
  await expect(owner).toHaveURL(/\/projects$/);
  await expect(owner.getByRole('link', { name: projectName })).toHaveCount(0);
  await owner.goto(`/projects/${projectId}`);
  await expect(owner.getByRole('heading', { name: 'This page could not be found' })).toBeVisible();
  await ownerContext.close();

  await page.reload();
  await expect(page.getByRole('region', { name: 'Proposed change' })).toHaveCount(0);
  await page.getByText('Earlier proposals').click();
  await expect(page.getByText(/confirmed/).first()).toBeVisible();
  await page.goto(`/projects/${projectId}`);
  await expect(page.getByText('Fernbrook Fibre Trust')).toBeVisible();
});
