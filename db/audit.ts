import type { Db } from './client';
import type { AuditRow } from './tables';

export interface AuditActor {
  userId: string | null;
  label: string;
  organisationId: string | null;
}

export interface AuditEntryInput {
  projectId?: string | null;
  organisationId?: string | null;
  objectType: string;
  objectId: string;
  action: string;
  before?: unknown;
  after?: unknown;
}

export interface AuditEntry {
  id: number;
  at: string;
  actorUserId: string | null;
  actorLabel: string;
  projectId: string | null;
  objectType: string;
  objectId: string;
  action: string;
  before: unknown;
  after: unknown;
}

const toDto = (r: AuditRow): AuditEntry => ({
  id: r.id,
  at: r.at.toISOString(),
  actorUserId: r.actor_user_id,
  actorLabel: r.actor_label,
  projectId: r.project_id,
  objectType: r.object_type,
  objectId: r.object_id,
  action: r.action,
  before: r.before,
  after: r.after,
});

/**
 * Writes one audit entry: who, when, which project and object, what, before and after.
 * Call it inside the transaction that makes the change so both land or neither does.
 * `await writeAudit(trx, actor, { projectId, objectType: 'project', objectId: id, action: 'update', before, after })`
 */
export async function writeAudit(db: Db, actor: AuditActor, e: AuditEntryInput): Promise<void> {
  await db('audit_log').insert({
    actor_user_id: actor.userId,
    actor_label: actor.label,
    organisation_id: e.organisationId ?? actor.organisationId,
    project_id: e.projectId ?? null,
    object_type: e.objectType,
    object_id: e.objectId,
    action: e.action,
    before: e.before === undefined ? null : JSON.stringify(e.before),
    after: e.after === undefined ? null : JSON.stringify(e.after),
  });
}

export async function listAuditForProject(db: Db, projectId: string, limit = 500): Promise<AuditEntry[]> {
  const rows = await db<AuditRow>('audit_log').where({ project_id: projectId }).orderBy('id', 'desc').limit(limit);
  return rows.map(toDto);
}

export async function listAuditForOrganisation(db: Db, organisationId: string, limit = 500): Promise<AuditEntry[]> {
  const rows = await db<AuditRow>('audit_log')
    .where({ organisation_id: organisationId })
    .whereNull('project_id')
    .orderBy('id', 'desc')
    .limit(limit);
  return rows.map(toDto);
}

/** Streams a project's entries oldest first, for exports. */
export function streamAuditForProject(db: Db, projectId: string) {
  return db<AuditRow>('audit_log').where({ project_id: projectId }).orderBy('id', 'asc').stream();
}
