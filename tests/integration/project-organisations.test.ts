import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { getProject } from '@/db/projects';
import { listOrgChanges } from '@/db/org-changes';
import { canSeeProject } from '@/lib/auth/roles';
import { changeProject, createProject, createProjectSchema, updateProjectSchema } from '@/lib/services/projects';
import { registerOrganisation, registerOrganisationSchema } from '@/lib/services/organisations';
import { answerOrgChange, proposeOrgChange, proposeOrgChangeSchema } from '@/lib/services/org-changes';
import { count, makePrincipal } from '../helpers/fixtures';

const db = getDb();
afterAll(() => closeDb());

/** An owner organisation and a contractor organisation, an admin of each, and a project between them. */
async function twoSides(name = `Harrow Lane ${Date.now()}`) {
  const ownerAdmin = await makePrincipal(db, 'admin', 'owner');
  const contractorAdmin = await makePrincipal(db, 'admin', 'contractor');
  const project = await createProject(db, contractorAdmin, createProjectSchema.parse({ name, partnerOrganisationId: ownerAdmin.organisationId }));
  return { ownerAdmin, contractorAdmin, project };
}

describe('picking the partner organisation', () => {
  it('creates a project with a partner picked by id, and refuses an unregistered name without creating it', async () => {
    const { ownerAdmin, project } = await twoSides();
    expect(project.ownerOrgId).toBe(ownerAdmin.organisationId);

    const admin = await makePrincipal(db, 'admin', 'contractor');
    const orgs = await count(db, 'organisations');
    const projects = await count(db, 'projects');
    const err = await createProject(db, admin, createProjectSchema.parse({ name: 'Typo owner', partnerOrganisation: `${ownerAdmin.organisationName}x` })).catch((e) => e);
    expect(err).toMatchObject({ code: 'invalid', details: [{ path: 'partnerOrganisation' }] });
    expect(err.message).toContain('not a registered organisation');
    expect({ orgs: await count(db, 'organisations'), projects: await count(db, 'projects') }).toEqual({ orgs, projects });
  });

  it('asks for a partner when none is given', () => {
    const r = createProjectSchema.safeParse({ name: 'No partner' });
    expect(r.success).toBe(false);
    expect(r.error!.issues.map((i) => i.path.join('.'))).toContain('partnerOrganisationId');
  });

  it('refuses a partner of the same side', async () => {
    const admin = await makePrincipal(db, 'admin', 'contractor');
    const rival = await makePrincipal(db, 'admin', 'contractor');
    await expect(createProject(db, admin, createProjectSchema.parse({ name: 'Same side', partnerOrganisationId: rival.organisationId }))).rejects.toMatchObject({ code: 'invalid' });
  });
});

describe('the typo case: a settings change cannot move a project', () => {
  it('refuses a typed owner name in the settings, and the project stays where it was', async () => {
    const { ownerAdmin, contractorAdmin, project } = await twoSides();
    const orgs = await count(db, 'organisations');
    // the old settings form sent the partner's name; a typo created a new organisation and moved the project
    const r = updateProjectSchema.safeParse({ name: project.name, partnerOrganisation: 'Quillhavn Open Fibre' });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0]).toMatchObject({ path: ['partnerOrganisation'] });
    expect(r.error!.issues[0].message).toContain('the other organisation confirms');
    for (const k of ['ownerOrgId', 'contractorOrgId', 'partnerOrganisationId']) {
      expect(updateProjectSchema.safeParse({ [k]: contractorAdmin.organisationId }).success, k).toBe(false);
    }
    // an ordinary settings change leaves the owner as it is
    await changeProject(db, contractorAdmin, project.id, { areaName: 'Harrow' });
    const after = (await getProject(db, project.id))!;
    expect(after.ownerOrgId).toBe(ownerAdmin.organisationId);
    expect(canSeeProject(ownerAdmin.organisationId, after)).toBe(true);
    expect(await count(db, 'organisations')).toBe(orgs);
  });
});

describe('registering an organisation', () => {
  it('is a deliberate step, audited, and refuses a name that only differs in case or punctuation', async () => {
    const admin = await makePrincipal(db, 'admin', 'contractor');
    const name = `Brackenridge Fibre ${Date.now()}`;
    const org = await registerOrganisation(db, admin, registerOrganisationSchema.parse({ name, kind: 'owner' }));
    expect(org).toMatchObject({ name, kind: 'owner' });
    const audit = await db('audit_log').where({ object_type: 'organisation', object_id: org.id });
    expect(audit.map((a) => a.action)).toEqual(['register']);
    const orgs = await count(db, 'organisations');
    const err = await registerOrganisation(db, admin, { name: ` ${name.toUpperCase().replace(' ', ' - ')}.`, kind: 'owner' }).catch((e) => e);
    expect(err).toMatchObject({ code: 'conflict' });
    expect(err.message).toContain(name);
    expect(await count(db, 'organisations')).toBe(orgs);
    expect(registerOrganisationSchema.safeParse({ name: 'X', kind: 'owner' }).success).toBe(false);
    expect(registerOrganisationSchema.safeParse({ name: 'Xylem Ducting', kind: 'supplier' }).success).toBe(false);
  });
});

describe('changing the network owner needs both organisations', () => {
  it('waits for the current owner to confirm; then the project moves and the old owner no longer sees it', async () => {
    const { ownerAdmin, contractorAdmin, project } = await twoSides();
    const newOwner = await makePrincipal(db, 'admin', 'owner');
    const input = proposeOrgChangeSchema.parse({ side: 'owner', organisationId: newOwner.organisationId, reason: 'The network was sold to the new owner.' });
    const change = await proposeOrgChange(db, contractorAdmin, project, input);
    expect(change).toMatchObject({ status: 'pending', side: 'owner', fromOrgId: ownerAdmin.organisationId, toOrgId: newOwner.organisationId, proposedByOrgId: contractorAdmin.organisationId });

    // nothing moved yet, and both sides see the pending proposal
    expect((await getProject(db, project.id))!.ownerOrgId).toBe(ownerAdmin.organisationId);
    expect((await listOrgChanges(db, project.id, true)).map((c) => c.id)).toEqual([change.id]);

    // the proposing side cannot confirm its own proposal; a second proposal waits for the first
    await expect(answerOrgChange(db, contractorAdmin, project, change.id, { decision: 'confirm' })).rejects.toMatchObject({ code: 'forbidden' });
    await expect(proposeOrgChange(db, contractorAdmin, project, input)).rejects.toMatchObject({ code: 'conflict' });
    // and the other side cannot withdraw it
    await expect(answerOrgChange(db, ownerAdmin, project, change.id, { decision: 'withdraw' })).rejects.toMatchObject({ code: 'forbidden' });
    expect((await getProject(db, project.id))!.ownerOrgId).toBe(ownerAdmin.organisationId);

    const out = await answerOrgChange(db, ownerAdmin, project, change.id, { decision: 'confirm', note: 'Agreed in the handover meeting.' });
    expect(out.change.status).toBe('confirmed');
    const moved = (await getProject(db, project.id))!;
    expect(moved.ownerOrgId).toBe(newOwner.organisationId);
    expect(moved.contractorOrgId).toBe(contractorAdmin.organisationId);
    expect(canSeeProject(ownerAdmin.organisationId, moved)).toBe(false);
    expect(canSeeProject(newOwner.organisationId, moved)).toBe(true);

    const audit = await db('audit_log').where({ project_id: project.id }).orderBy('id');
    expect(audit.map((a) => `${a.object_type} ${a.action}`)).toEqual(['project create', 'org_change propose', 'project update', 'org_change confirm']);
    expect(audit[2].before).toEqual({ ownerOrganisation: ownerAdmin.organisationName });
    expect(audit[2].after).toEqual({ ownerOrganisation: newOwner.organisationName });
    expect(audit[3].actor_user_id).toBe(ownerAdmin.id);

    // an answered proposal cannot be answered again
    await expect(answerOrgChange(db, newOwner, moved, change.id, { decision: 'decline' })).rejects.toMatchObject({ code: 'conflict' });
  });

  it('leaves the project where it is when the other side declines or the proposer withdraws', async () => {
    const { ownerAdmin, contractorAdmin, project } = await twoSides();
    const otherContractor = await makePrincipal(db, 'admin', 'contractor');
    // the owner proposes a new contractor; the current contractor declines
    const c1 = await proposeOrgChange(db, ownerAdmin, project, { side: 'contractor', organisationId: otherContractor.organisationId, reason: 'Phase 2 goes to another firm.' });
    await expect(answerOrgChange(db, ownerAdmin, project, c1.id, { decision: 'confirm' })).rejects.toMatchObject({ code: 'forbidden' });
    expect((await answerOrgChange(db, contractorAdmin, project, c1.id, { decision: 'decline', note: 'Phase 1 is not handed over yet.' })).change.status).toBe('declined');
    expect((await getProject(db, project.id))!.contractorOrgId).toBe(contractorAdmin.organisationId);
    // a new proposal is possible once the first is answered; its proposer withdraws it
    const c2 = await proposeOrgChange(db, ownerAdmin, project, { side: 'contractor', organisationId: otherContractor.organisationId, reason: 'Asking again after handover.' });
    expect((await answerOrgChange(db, ownerAdmin, project, c2.id, { decision: 'withdraw' })).change.status).toBe('withdrawn');
    expect((await getProject(db, project.id))!.contractorOrgId).toBe(contractorAdmin.organisationId);
    expect((await listOrgChanges(db, project.id)).map((c) => c.status)).toEqual(['withdrawn', 'declined']);
  });

  it('refuses a target of the wrong kind, the current organisation, and a missing reason', async () => {
    const { ownerAdmin, contractorAdmin, project } = await twoSides();
    const changes = await count(db, 'project_org_changes');
    await expect(proposeOrgChange(db, contractorAdmin, project, { side: 'owner', organisationId: contractorAdmin.organisationId, reason: 'wrong kind' })).rejects.toMatchObject({ code: 'invalid' });
    await expect(proposeOrgChange(db, contractorAdmin, project, { side: 'owner', organisationId: ownerAdmin.organisationId, reason: 'same owner' })).rejects.toMatchObject({ code: 'invalid' });
    expect(proposeOrgChangeSchema.safeParse({ side: 'owner', organisationId: ownerAdmin.organisationId, reason: '' }).success).toBe(false);
    expect(await count(db, 'project_org_changes')).toBe(changes);
  });
});
