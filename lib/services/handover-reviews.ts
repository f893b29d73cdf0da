import type { Knex } from 'knex';
import { z } from 'zod';
import { writeAudit } from '@/db/audit';
import {
  getHandoverSummary, insertComments, listCommentsOf, lockHandover, recipientsOf, sectionsOfProject, setReview,
  snapshotSectionIds, type HandoverSummary,
} from '@/db/handover-reviews';
import type { Project } from '@/db/projects';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { can } from '@/lib/auth/roles';
import { appUrl, enqueueMail } from '@/lib/mail/outbox';

// The network owner's review of a handover package, and the contractor's answers to a return (issue 16).
// Building and issuing a package is lib/services/handovers.ts.

const text = z.string().trim().min(1, 'Write the comment.').max(4000, 'At most 4000 characters.');

export const reviewSchema = z.object({
  decision: z.enum(['accept', 'return'], { message: 'Accept the package or return it.' }),
  comments: z.array(z.object({ sectionId: z.string().uuid('Pick a section of the package.').nullish(), text })).max(200).default([]),
}).strict();
export type ReviewInput = z.infer<typeof reviewSchema>;

export const answersSchema = z.object({
  answers: z.array(z.object({ commentId: z.number().int().positive(), text })).min(1, 'Answer at least one comment.').max(200),
}).strict();
export type AnswersInput = z.infer<typeof answersSchema>;

/** Who reviews: the owner's admins and owners only (the route says the same with side: 'owner'). */
function assertOwnerReviewer(actor: Principal, project: Project): void {
  if (!can(actor.role, 'handover.review')) throw new AppError('forbidden', `Your role (${actor.role}) may not do this.`);
  if (actor.organisationId !== project.ownerOrgId) throw new AppError('forbidden', `Only the network owner's people (${project.ownerOrgName}) accept or return what is handed over.`);
}

function assertContractorBuilder(actor: Principal, project: Project): void {
  if (!can(actor.role, 'handover.build')) throw new AppError('forbidden', `Your role (${actor.role}) may not do this.`);
  if (actor.organisationId !== project.contractorOrgId) throw new AppError('forbidden', `Only the contractor's people (${project.contractorOrgName}) answer the network owner's comments.`);
}

const STATUS_WORDS: Record<string, string> = { building: 'still being built', failed: 'a failed build', accepted: 'already accepted', returned: 'already returned' };

/** The body of the e-mail telling of a review. */
export function reviewMailBody(project: Project, revision: number, decision: 'accept' | 'return', reviewer: Principal, comments: { label: string | null; text: string }[], link: string): string {
  const lines = [
    `${reviewer.name} (${project.ownerOrgName}) has ${decision === 'accept' ? 'accepted' : 'returned'} revision ${revision} of the handover package of ${project.name}.`,
    '',
  ];
  if (comments.length) {
    lines.push(decision === 'return' ? 'Comments to answer in the next revision:' : 'Comments:');
    for (const c of comments) lines.push(`- ${c.label ? `Section ${c.label}` : 'The package as a whole'}: ${c.text}`);
    lines.push('');
  }
  lines.push(`See it at ${link}`);
  return lines.join('\n');
}

/**
 * Accepts or returns an issued revision, once: status, reviewer and time, the comments and the audit entry
 * in one transaction, with the e-mail to the contractor's admins and engineers queued in it too. Returning
 * needs a comment; a comment's section must be one of the package's own sections of this project.
 */
export async function reviewHandover(db: Knex, actor: Principal, project: Project, handoverId: string, input: ReviewInput): Promise<HandoverSummary> {
  assertOwnerReviewer(actor, project);
  if (input.decision === 'return' && input.comments.length === 0) {
    throw new AppError('invalid', 'Say why the package is returned: add at least one comment.', [{ path: 'comments', message: 'Returning needs at least one comment.' }]);
  }
  await db.transaction(async (trx) => {
    const h = await lockHandover(trx, handoverId);
    if (!h || h.project_id !== project.id) throw new AppError('not_found', 'No such handover package in this project.');
    if (h.status !== 'issued') {
      throw new AppError('conflict', `Revision ${h.revision} is ${STATUS_WORDS[h.status] ?? h.status}: only an issued package is accepted or returned, once.`, { status: h.status });
    }
    const sectionIds = [...new Set(input.comments.map((c) => c.sectionId).filter((x): x is string => Boolean(x)))];
    const known = await sectionsOfProject(trx, project.id, sectionIds);
    const inPackage = new Set(snapshotSectionIds(h.snapshot));
    const problems = input.comments.flatMap((c, i) =>
      c.sectionId && (!known.has(c.sectionId) || (inPackage.size > 0 && !inPackage.has(c.sectionId)))
        ? [{ path: `comments.${i}.sectionId`, message: known.has(c.sectionId) ? `Section ${known.get(c.sectionId)} is not in revision ${h.revision}.` : 'That section is not in this project.' }]
        : [],
    );
    if (problems.length) throw new AppError('invalid', `Comment ${Number(problems[0].path.split('.')[1]) + 1}: ${problems[0].message} Comment only on the package's own sections.`, problems);
    const status = input.decision === 'accept' ? 'accepted' : 'returned';
    const general = input.comments.filter((c) => !c.sectionId).map((c) => c.text).join('\n\n');
    await setReview(trx, h.id, status, actor.id, general);
    const ids = await insertComments(trx, input.comments.map((c) => ({ handoverId: h.id, sectionId: c.sectionId ?? null, kind: 'return' as const, answersId: null, text: c.text, authorId: actor.id })));
    await writeAudit(trx, auditActor(actor), {
      projectId: project.id, objectType: 'handover', objectId: h.id, action: status === 'accepted' ? 'accept' : 'return',
      before: { revision: h.revision, status: h.status },
      after: { revision: h.revision, status, comments: input.comments.map((c, i) => ({ id: ids[i], section: c.sectionId ? known.get(c.sectionId) : null, text: c.text })) },
    });
    const to = await recipientsOf(trx, project.contractorOrgId, ['admin', 'engineer']);
    await enqueueMail(trx, {
      kind: status === 'accepted' ? 'handover_accepted' : 'handover_returned',
      to: to.map((u) => u.email),
      projectId: project.id,
      subject: `${project.name}: handover revision ${h.revision} ${status}`,
      body: reviewMailBody(project, h.revision, input.decision, actor, input.comments.map((c) => ({ label: c.sectionId ? known.get(c.sectionId)! : null, text: c.text })), `${appUrl()}/projects/${project.id}/handover`),
    });
  });
  return (await getHandoverSummary(db, handoverId))!;
}

/**
 * The contractor's answers to the owner's comments on a returned revision (the new revision is built with
 * lib/services/handovers.ts). Each answer names a comment of this package the owner wrote when returning it.
 */
export async function answerComments(db: Knex, actor: Principal, project: Project, handoverId: string, input: AnswersInput): Promise<HandoverSummary> {
  assertContractorBuilder(actor, project);
  await db.transaction(async (trx) => {
    const h = await lockHandover(trx, handoverId);
    if (!h || h.project_id !== project.id) throw new AppError('not_found', 'No such handover package in this project.');
    if (h.status !== 'returned') throw new AppError('conflict', `Revision ${h.revision} was not returned: there is nothing to answer.`, { status: h.status });
    const comments = new Map((await listCommentsOf(trx, [h.id])).filter((c) => c.kind === 'return').map((c) => [c.id, c]));
    const problems = input.answers.flatMap((a, i) => (comments.has(a.commentId) ? [] : [{ path: `answers.${i}.commentId`, message: `Comment ${a.commentId} is not one of the owner's comments on revision ${h.revision}.` }]));
    if (problems.length) throw new AppError('invalid', problems[0].message, problems);
    const ids = await insertComments(trx, input.answers.map((a) => ({ handoverId: h.id, sectionId: comments.get(a.commentId)!.sectionId, kind: 'answer' as const, answersId: a.commentId, text: a.text, authorId: actor.id })));
    await writeAudit(trx, auditActor(actor), {
      projectId: project.id, objectType: 'handover', objectId: h.id, action: 'answer',
      after: { revision: h.revision, answers: input.answers.map((a, i) => ({ id: ids[i], answers: a.commentId, text: a.text })) },
    });
  });
  return (await getHandoverSummary(db, handoverId))!;
}

/**
 * The e-mail telling the owner's owners and admins that a revision was issued. Call it in the transaction
 * that issues the package (lib/services/handovers.ts or its job).
 */
export async function queueIssuedMail(trx: Knex | Knex.Transaction, project: Project, h: { revision: number; fileName: string | null; sizeBytes: number | null; note?: string | null }): Promise<void> {
  const to = await recipientsOf(trx, project.ownerOrgId, ['admin', 'owner']);
  await enqueueMail(trx, {
    kind: 'handover_issued',
    to: to.map((u) => u.email),
    projectId: project.id,
    subject: `${project.name}: handover revision ${h.revision} issued`,
    body: [
      `${project.contractorOrgName} has issued revision ${h.revision} of the handover package of ${project.name}${h.fileName ? ` (${h.fileName}${h.sizeBytes ? `, ${(h.sizeBytes / 1024).toFixed(0)} KB` : ''})` : ''}.`,
      h.note ? `Note: ${h.note}` : '',
      '',
      `Review it (accept, or return it with comments) at ${appUrl()}/projects/${project.id}/handover`,
      '',
      'The records must be verified on site before digging; defer to local codes and licensed practice.',
    ].filter((l, i) => l !== '' || i > 1).join('\n'),
  });
}
