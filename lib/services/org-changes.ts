import type { Knex } from 'knex';
import { z } from 'zod';
import { writeAudit } from '@/db/audit';
import { answerOrgChange as closeOrgChange, getOrgChange, insertOrgChange, listOrgChanges, type OrgChange } from '@/db/org-changes';
import { getOrganisation } from '@/db/organisations';
import { getProject, updateProject, type Project } from '@/db/projects';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { ORG_KINDS, type OrgKind } from '@/lib/auth/roles';

export const proposeOrgChangeSchema = z.object({
  side: z.enum(ORG_KINDS, { message: 'Say whether the network owner or the contractor changes.' }),
  organisationId: z.uuid('Pick the new organisation from the list.'),
  reason: z.string().trim().min(3, 'Say why: the other organisation reads it before it confirms.').max(1000),
});

export const answerOrgChangeSchema = z.object({
  decision: z.enum(['confirm', 'decline', 'withdraw'], { message: 'Answer confirm, decline or withdraw.' }),
  note: z.string().trim().max(1000).optional(),
});

const sideName = (side: OrgKind) => (side === 'owner' ? 'network owner' : 'contractor');
const orgOn = (p: Project, side: OrgKind) => (side === 'owner' ? { id: p.ownerOrgId, name: p.ownerOrgName } : { id: p.contractorOrgId, name: p.contractorOrgName });
/** The project's organisation that is not the given one. */
const otherOrg = (p: Project, orgId: string) => (p.ownerOrgId === orgId ? orgOn(p, 'contractor') : orgOn(p, 'owner'));

/** A project's proposals, newest first (both organisations see them). */
export const orgChangesOf = (db: Knex, projectId: string) => listOrgChanges(db, projectId);

/**
 * An admin of one of the project's two organisations proposes a new network owner or contractor. Nothing
 * moves yet: the change waits for an admin of the other organisation (`answerOrgChange`).
 */
export async function proposeOrgChange(db: Knex, actor: Principal, project: Project, input: z.infer<typeof proposeOrgChangeSchema>): Promise<OrgChange> {
  return db.transaction(async (trx) => {
    const target = await getOrganisation(trx, input.organisationId);
    const current = orgOn(project, input.side);
    if (!target || target.kind !== input.side) {
      throw new AppError('invalid', `Pick a registered ${sideName(input.side)} organisation.`, [{ path: 'organisationId', message: `Pick a registered ${sideName(input.side)}.` }]);
    }
    if (target.id === current.id) {
      throw new AppError('invalid', `${target.name} is already the ${sideName(input.side)}.`, [{ path: 'organisationId', message: 'Pick a different organisation.' }]);
    }
    const pending = await listOrgChanges(trx, project.id, true);
    if (pending.length) throw new AppError('conflict', `A change of ${sideName(pending[0].side)} to ${pending[0].toOrgName} is waiting for an answer; it must be confirmed, declined or withdrawn first.`);
    let id: number;
    try {
      id = await insertOrgChange(trx, { projectId: project.id, side: input.side, fromOrgId: current.id, toOrgId: target.id, reason: input.reason, proposedBy: actor.id, proposedByOrgId: actor.organisationId });
    } catch (e) {
      // the partial unique index: someone proposed at the same moment
      if ((e as { code?: string }).code === '23505') throw new AppError('conflict', 'Another change was proposed a moment ago; reload to see it.');
      throw e;
    }
    const change = (await getOrgChange(trx, id))!;
    await writeAudit(trx, auditActor(actor), {
      projectId: project.id, objectType: 'org_change', objectId: String(id), action: 'propose',
      after: { side: input.side, from: current.name, to: target.name, reason: input.reason, waitingFor: otherOrg(project, actor.organisationId).name },
    });
    return change;
  });
}

/**
 * Answers a pending proposal. An admin of the other organisation confirms (the project moves now) or
 * declines it; the proposing organisation may withdraw it.
 */
export async function answerOrgChange(db: Knex, actor: Principal, project: Project, changeId: number, input: z.infer<typeof answerOrgChangeSchema>): Promise<{ change: OrgChange; project: Project | null }> {
  return db.transaction(async (trx) => {
    const change = await getOrgChange(trx, changeId);
    if (!change || change.projectId !== project.id) throw new AppError('not_found', 'Not found, or not visible to your organisation.');
    if (change.status !== 'pending') throw new AppError('conflict', `This proposal was already ${change.status}.`);
    const ownSide = actor.organisationId === change.proposedByOrgId;
    if (input.decision === 'withdraw' && !ownSide) {
      throw new AppError('forbidden', `Only ${change.proposedByOrgName}, who proposed it, can withdraw it; you can confirm or decline it.`);
    }
    if (input.decision !== 'withdraw' && ownSide) {
      throw new AppError('forbidden', `An admin of ${otherOrg(project, actor.organisationId).name} must ${input.decision} it: a change needs both organisations.`);
    }
    const status = ({ confirm: 'confirmed', decline: 'declined', withdraw: 'withdrawn' } as const)[input.decision];
    if (!(await closeOrgChange(trx, changeId, status, actor.id, input.note ?? null))) throw new AppError('conflict', 'This proposal was answered a moment ago; reload to see the answer.');
    let moved: Project | null = null;
    if (status === 'confirmed') {
      const before = (await getProject(trx, project.id))!;
      if (orgOn(before, change.side).id !== change.fromOrgId) throw new AppError('conflict', `The ${sideName(change.side)} is no longer ${change.fromOrgName}.`);
      try {
        moved = await updateProject(trx, project.id, change.side === 'owner' ? { ownerOrgId: change.toOrgId } : { contractorOrgId: change.toOrgId });
      } catch (e) {
        if ((e as { code?: string }).code === '23505') throw new AppError('conflict', `${change.toOrgName} already has a project named "${project.name}"; rename one of them first.`);
        throw e;
      }
      await writeAudit(trx, auditActor(actor), {
        projectId: project.id, objectType: 'project', objectId: project.id, action: 'update',
        before: { [change.side === 'owner' ? 'ownerOrganisation' : 'contractorOrganisation']: change.fromOrgName },
        after: { [change.side === 'owner' ? 'ownerOrganisation' : 'contractorOrganisation']: change.toOrgName },
      });
    }
    await writeAudit(trx, auditActor(actor), {
      projectId: project.id, objectType: 'org_change', objectId: String(changeId), action: input.decision,
      before: { status: 'pending' }, after: { status, side: change.side, from: change.fromOrgName, to: change.toOrgName, note: input.note ?? null },
    });
    return { change: (await getOrgChange(trx, changeId))!, project: moved };
  });
}
