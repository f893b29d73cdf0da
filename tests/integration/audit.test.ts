import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { AppError } from '@/lib/api/errors';
import { changeUser, createUser } from '@/lib/services/users';
import { changeProject, createProject, createProjectSchema } from '@/lib/services/projects';
import { createToken } from '@/lib/services/tokens';
import { findUserByTokenHash } from '@/db/api-tokens';
import { hashSecret } from '@/lib/auth/secret-token';
import { loadPrincipal } from '@/lib/auth/principal';
import { count, makePrincipal, registerPartner } from '../helpers/fixtures';

const db = getDb();
afterAll(() => closeDb());

const auditFor = (objectId: string) => db('audit_log').where({ object_id: objectId }).orderBy('id');

describe('audit log for user changes', () => {
  it('records create and update with before and after', async () => {
    const admin = await makePrincipal(db, 'admin', 'owner');
    const { user, onboarding } = await createUser(db, admin, { email: `new-${Date.now()}@test.example`, name: 'New Person', role: 'surveyor', onboarding: 'invitation' }, 72);
    expect(onboarding.linkPath).toMatch(/^\/welcome\/tbl_/);
    await changeUser(db, admin, user.id, { role: 'engineer' }, 72);
    const entries = await auditFor(user.id);
    expect(entries.map((e) => e.action)).toEqual(['create', 'update']);
    expect(entries[0].actor_user_id).toBe(admin.id);
    expect(entries[0].organisation_id).toBe(admin.organisationId);
    expect(entries[1].before).toMatchObject({ role: 'surveyor' });
    expect(entries[1].after).toMatchObject({ role: 'engineer' });
  });

  it('revokes API tokens on deactivation and on a role change', async () => {
    const admin = await makePrincipal(db, 'admin', 'contractor');
    const worker = await makePrincipal(db, 'surveyor', 'contractor', admin.organisationName);
    const t1 = await createToken(db, worker, { name: 'rover' });
    expect(await findUserByTokenHash(db, hashSecret(t1.secret))).toBeDefined();
    const r1 = await changeUser(db, admin, worker.id, { role: 'engineer' }, 72);
    expect(r1.revokedTokens).toBe(1);
    expect(await findUserByTokenHash(db, hashSecret(t1.secret))).toBeUndefined();
    expect((await loadPrincipal(db, worker.id))!.role).toBe('engineer');

    const t2 = await createToken(db, worker, { name: 'rover 2' });
    const r2 = await changeUser(db, admin, worker.id, { active: false }, 72);
    expect(r2.revokedTokens).toBe(1);
    expect(await findUserByTokenHash(db, hashSecret(t2.secret))).toBeUndefined();
    expect(await loadPrincipal(db, worker.id)).toBeUndefined();
  });

  it('does not let an admin change a user of another organisation', async () => {
    const admin = await makePrincipal(db, 'admin', 'owner');
    const stranger = await makePrincipal(db, 'surveyor', 'contractor');
    await expect(changeUser(db, admin, stranger.id, { role: 'admin' }, 72)).rejects.toMatchObject({ code: 'not_found' });
  });
});

describe('audit log for project changes', () => {
  it('records create and update with before and after', async () => {
    const admin = await makePrincipal(db, 'admin', 'owner');
    const input = createProjectSchema.parse({ name: 'Audit street works', partnerOrganisation: await registerPartner(db, admin, `Partner ${Date.now()}`), defaultCrs: 'EPSG:25833', timeZone: 'Europe/Berlin' });
    const project = await createProject(db, admin, input);
    expect(project.defaultCrs).toBe('EPSG:25833');
    await changeProject(db, admin, project.id, { lateralToleranceM: 0.8 });
    const entries = await db('audit_log').where({ project_id: project.id }).orderBy('id');
    expect(entries.map((e) => e.action)).toEqual(['create', 'update']);
    expect(entries[1].before.lateralToleranceM).toBe(0.5);
    expect(entries[1].after.lateralToleranceM).toBe(0.8);
  });

  it('refuses an EPSG code missing from the catalogue and stores nothing', async () => {
    const admin = await makePrincipal(db, 'admin', 'owner');
    const before = { projects: await count(db, 'projects'), orgs: await count(db, 'organisations'), audit: await count(db, 'audit_log') };
    const input = createProjectSchema.parse({ name: 'Bad grid', partnerOrganisation: `Never made ${Date.now()}`, defaultCrs: 'EPSG:999999' });
    const err = await createProject(db, admin, input).catch((e) => e);
    expect(err).toBeInstanceOf(AppError);
    expect(err.code).toBe('invalid');
    expect(err.message).toContain('EPSG:999999');
    expect({ projects: await count(db, 'projects'), orgs: await count(db, 'organisations'), audit: await count(db, 'audit_log') }).toEqual(before);
  });

  it('refuses a partner from the wrong side', async () => {
    const admin = await makePrincipal(db, 'admin', 'owner');
    const otherOwner = await makePrincipal(db, 'admin', 'owner');
    const input = createProjectSchema.parse({ name: 'Wrong partner', partnerOrganisation: otherOwner.organisationName });
    await expect(createProject(db, admin, input)).rejects.toMatchObject({ code: 'invalid' });
  });

  it('validates settings with specific messages', () => {
    const r = createProjectSchema.safeParse({ name: '', partnerOrganisation: 'X Co', timeZone: 'Mars/Olympus', extent: [10, 50, 9, 51], minCoverDepthM: -1 });
    expect(r.success).toBe(false);
    const paths = r.error!.issues.map((i) => i.path.join('.'));
    expect(paths).toEqual(expect.arrayContaining(['name', 'timeZone', 'extent', 'minCoverDepthM']));
  });
});
