import { randomUUID } from 'node:crypto';
import { NextRequest } from 'next/server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { AppError } from '@/lib/api/errors';
import { startFakeSmtp } from '@/lib/mail/fake-smtp';
import { appUrl, listOutbox, MAX_ATTEMPTS, sendDueMail } from '@/lib/mail/outbox';
import { smtpSender } from '@/lib/mail/transport';
import { answerComments, answersSchema, reviewHandover, reviewSchema } from '@/lib/services/handover-reviews';
import { createToken } from '@/lib/services/tokens';
import { createUser, createUserSchema } from '@/lib/services/users';
import { describeAudit } from '@/components/audit-words';
import { POST as reviewRoute } from '@/app/api/handovers/[handoverId]/review/route';
import { POST as answersRoute } from '@/app/api/handovers/[handoverId]/answers/route';
import { GET as listRoute } from '@/app/api/projects/[projectId]/handovers/route';
import { count, makePrincipal } from '../helpers/fixtures';
import { makeRecordPlan, type RecordPlan } from '../helpers/record-plan';

// The owner's review of handover packages, the contractor's answers, and the e-mail outbox with its delivery
// through the local fake SMTP server (issue 16, helper E2). The packages here are rows as an issued build
// leaves them (a test-only insert: the package builder is tested in its own file).

const db = getDb();
let plan: RecordPlan;
let foreign: RecordPlan;
let sections: string[];
let outsideSection: string;
let foreignSection: string;
const FROM = 'Trenchbook <trenchbook@test.example>';

async function sectionOf(p: RecordPlan, from: number, to: number): Promise<string> {
  const [a, b] = [p.at(from, 0), p.at(to, 0)];
  const [row] = await db('sections').insert({
    project_id: p.project.id, planned_route_ref: 'S-1', status: 'as_planned', from_chainage_m: from, to_chainage_m: to,
    geom: db.raw('ST_SetSRID(ST_MakeLine(ST_MakePoint(?, ?), ST_MakePoint(?, ?)), 4326)', [a[0], a[1], b[0], b[1]]),
    length_m: to - from, max_offset_m: 0.1, p95_offset_m: 0.1, accuracy_m: 0.05, laid_on: '2026-11-03', first_run: 1, last_run: 1, review: 'approved',
  }).returning('id');
  return row.id;
}

/** A package row as an issued build leaves it, holding `sectionIds`. */
async function packageOf(p: RecordPlan, revision: number, sectionIds: string[], status: 'issued' | 'building' | 'failed' = 'issued'): Promise<string> {
  const issued = status === 'issued';
  const [row] = await db('handovers').insert({
    project_id: p.project.id, revision, status, created_by: p.engineer.id,
    storage_key: issued ? `handovers/test-${randomUUID()}.zip` : null, sha256: issued ? 'a'.repeat(64) : null, size_bytes: issued ? 1234 : null,
    file_name: issued ? `handover-r${revision}.zip` : null, issued_at: issued ? db.fn.now() : null,
    failure_reason: status === 'failed' ? 'test' : null, snapshot: JSON.stringify({ sections: sectionIds.map((id) => ({ id })) }),
  }).returning('id');
  return row.id;
}

async function refusal(p: Promise<unknown>): Promise<AppError> {
  const err = await p.then(() => null, (e: unknown) => e);
  expect(err).toBeInstanceOf(AppError);
  return err as AppError;
}

const review = (body: unknown) => reviewSchema.parse(body);

beforeAll(async () => {
  plan = await makeRecordPlan(db, 'Handover review', [9.8, 52.8]);
  foreign = await makeRecordPlan(db, 'Handover review elsewhere', [9.9, 52.9]);
  sections = [await sectionOf(plan, 0, 120), await sectionOf(plan, 120, 200)];
  outsideSection = await sectionOf(plan, 200, 210);
  foreignSection = await sectionOf(foreign, 0, 50);
});
afterAll(() => closeDb());

describe('the owner\'s review', () => {
  it('is the owner\'s alone: the contractor\'s people and the owner\'s maintenance role are refused, nothing stored', async () => {
    const id = await packageOf(plan, 1, sections);
    const before = await count(db, 'handover_comments');
    for (const who of [plan.engineer, plan.admin, plan.maintenance]) {
      const err = await refusal(reviewHandover(db, who, plan.project, id, review({ decision: 'accept' })));
      expect(err.code).toBe('forbidden');
    }
    expect((await db('handovers').where({ id }).first()).status).toBe('issued');
    expect(await count(db, 'handover_comments')).toBe(before);
    await db('handovers').where({ id }).delete();
  });

  it('returning needs a comment; a section of another project or outside the package is refused with nothing stored', async () => {
    const id = await packageOf(plan, 1, sections);
    const counts = async () => [await count(db, 'handover_comments'), await count(db, 'audit_log'), await count(db, 'mail_outbox')];
    const before = await counts();
    const none = await refusal(reviewHandover(db, plan.owner, plan.project, id, review({ decision: 'return', comments: [] })));
    expect([none.code, none.message]).toEqual(['invalid', 'Say why the package is returned: add at least one comment.']);
    const alien = await refusal(reviewHandover(db, plan.owner, plan.project, id, review({ decision: 'return', comments: [{ text: 'ok' }, { sectionId: foreignSection, text: 'Not ours' }] })));
    expect(alien.code).toBe('invalid');
    expect(alien.details).toEqual([{ path: 'comments.1.sectionId', message: 'That section is not in this project.' }]);
    const outside = await refusal(reviewHandover(db, plan.owner, plan.project, id, review({ decision: 'return', comments: [{ sectionId: outsideSection, text: 'Where is it?' }] })));
    expect(outside.details).toEqual([{ path: 'comments.0.sectionId', message: 'Section S-1 200–210 m is not in revision 1.' }]);
    expect(await counts()).toEqual(before);
    expect((await db('handovers').where({ id }).first()).status).toBe('issued');
    // a package of another project is not found through this project
    const theirs = await packageOf(foreign, 1, [foreignSection]);
    expect((await refusal(reviewHandover(db, plan.owner, plan.project, theirs, review({ decision: 'accept' })))).code).toBe('not_found');
    await db('handovers').whereIn('id', [id, theirs]).delete();
  });

  it('returns an issued revision once, in one transaction: status, reviewer, comments, audit entry and the e-mail to the contractor', async () => {
    const id = await packageOf(plan, 1, sections);
    const h = await reviewHandover(db, plan.owner, plan.project, id, review({ decision: 'return', comments: [{ sectionId: sections[0], text: 'The depth readings at 60 m are missing.' }, { text: 'Add the crossings\' photos.' }] }));
    expect([h.status, h.reviewedBy, h.reviewedByName, h.reviewComment]).toEqual(['returned', plan.owner.id, plan.owner.name, 'Add the crossings\' photos.']);
    expect(h.comments.map((c) => [c.kind, c.sectionId, c.sectionLabel, c.text])).toEqual([
      ['return', sections[0], 'S-1 0–120 m', 'The depth readings at 60 m are missing.'],
      ['return', null, null, 'Add the crossings\' photos.'],
    ]);
    const audit = await db('audit_log').where({ object_type: 'handover', object_id: id }).orderBy('id');
    expect(audit.map((a) => [a.action, a.actor_user_id, a.project_id])).toEqual([['return', plan.owner.id, plan.project.id]]);
    expect(describeAudit({ objectType: 'handover', action: 'return', before: audit[0].before, after: audit[0].after }))
      .toBe('Returned handover revision 1 with 2 comments (section S-1 0–120 m: “The depth readings at 60 m are missing.”; the package: “Add the crossings\' photos.”).');
    const mail = await db('mail_outbox').where({ project_id: plan.project.id, kind: 'handover_returned' });
    expect(mail).toHaveLength(1);
    // the contractor's admin and engineer, not its surveyor, not the owner
    expect([...mail[0].to_addresses].sort()).toEqual([plan.admin.email, plan.engineer.email].sort());
    expect(mail[0].body).toContain('- Section S-1 0–120 m: The depth readings at 60 m are missing.');
    expect(mail[0].body).toContain(`${appUrl()}/projects/${plan.project.id}/handover`);
    // once
    const again = await refusal(reviewHandover(db, plan.owner, plan.project, id, review({ decision: 'accept' })));
    expect([again.code, again.message]).toEqual(['conflict', 'Revision 1 is already returned: only an issued package is accepted or returned, once.']);
  });

  it('refuses a revision still building or failed (409)', async () => {
    for (const [rev, status] of [[2, 'building'], [3, 'failed']] as const) {
      const id = await packageOf(plan, rev, sections, status);
      expect((await refusal(reviewHandover(db, plan.owner, plan.project, id, review({ decision: 'accept' })))).code).toBe('conflict');
      await db('handovers').where({ id }).delete();
    }
  });

  it('the contractor\'s engineer answers the comments of a returned revision; the owner cannot; only its own comments', async () => {
    const h = (await db('handovers').where({ project_id: plan.project.id, revision: 1 }).first())!;
    const comments = await db('handover_comments').where({ handover_id: h.id, kind: 'return' }).orderBy('id');
    expect((await refusal(answerComments(db, plan.owner, plan.project, h.id, answersSchema.parse({ answers: [{ commentId: Number(comments[0].id), text: 'x' }] })))).code).toBe('forbidden');
    const wrong = await refusal(answerComments(db, plan.engineer, plan.project, h.id, answersSchema.parse({ answers: [{ commentId: 999999999, text: 'x' }] })));
    expect(wrong.details).toEqual([{ path: 'answers.0.commentId', message: 'Comment 999999999 is not one of the owner\'s comments on revision 1.' }]);
    const answered = await answerComments(db, plan.engineer, plan.project, h.id, answersSchema.parse({ answers: [{ commentId: Number(comments[0].id), text: 'Depth read again on 4 November; in revision 2.' }] }));
    const a = answered.comments.filter((c) => c.kind === 'answer');
    expect(a.map((c) => [c.answersId, c.sectionId, c.text, c.authorId])).toEqual([[Number(comments[0].id), sections[0], 'Depth read again on 4 November; in revision 2.', plan.engineer.id]]);
    const audit = await db('audit_log').where({ object_type: 'handover', object_id: h.id, action: 'answer' });
    expect(audit).toHaveLength(1);
  });

  it('accepts the next revision; the API answers 403 for the contractor (side), 404 across projects, lists newest first with counts', async () => {
    const id2 = await packageOf(plan, 2, sections);
    const ownerToken = (await createToken(db, plan.owner, { name: 'handover' })).secret;
    const engineerToken = (await createToken(db, plan.engineer, { name: 'handover' })).secret;
    const foreignOwner = (await createToken(db, foreign.owner, { name: 'handover' })).secret;
    const call = (handler: (req: NextRequest, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>, method: string, url: string, token: string, params: Record<string, string>, body?: unknown) =>
      handler(new NextRequest(`http://127.0.0.1${url}`, { method, headers: { authorization: `Bearer ${token}`, 'content-type': 'application/json' }, body: body === undefined ? undefined : JSON.stringify(body) }), { params: Promise.resolve(params) });
    const url = `/api/handovers/${id2}/review`;
    expect((await call(reviewRoute, 'POST', url, engineerToken, { handoverId: id2 }, { decision: 'accept' })).status).toBe(403);
    expect((await call(reviewRoute, 'POST', url, foreignOwner, { handoverId: id2 }, { decision: 'accept' })).status).toBe(404);
    expect((await call(reviewRoute, 'POST', url, ownerToken, { handoverId: id2 }, { decision: 'maybe' })).status).toBe(422);
    const ok = await call(reviewRoute, 'POST', url, ownerToken, { handoverId: id2 }, { decision: 'accept' });
    expect(ok.status).toBe(200);
    expect(((await ok.json()) as { handover: { status: string } }).handover.status).toBe('accepted');
    expect((await call(answersRoute, 'POST', `/api/handovers/${id2}/answers`, engineerToken, { handoverId: id2 }, { answers: [{ commentId: 1, text: 'x' }] })).status).toBe(409);
    const list = await call(listRoute, 'GET', `/api/projects/${plan.project.id}/handovers`, engineerToken, { projectId: plan.project.id });
    const body = (await list.json()) as { handovers: { revision: number; status: string; counts: Record<string, number> }[] };
    expect(body.handovers.map((h) => [h.revision, h.status, h.counts])).toEqual([
      [2, 'accepted', { comments: 0, answers: 0, open: 0 }],
      [1, 'returned', { comments: 2, answers: 1, open: 1 }],
    ]);
    const accepted = await db('mail_outbox').where({ project_id: plan.project.id, kind: 'handover_accepted' });
    expect(accepted.map((m) => m.subject)).toEqual([`${plan.project.name}: handover revision 2 accepted`]);
  });
});

describe('e-mail through the outbox and the fake SMTP server', () => {
  it('delivers the returned package\'s e-mail with its comments; an SMTP server down and a restart lose nothing', async () => {
    // the SMTP server is down: the attempt fails, is counted and waits
    const down = await startFakeSmtp(db, 0);
    const deadPort = down.port;
    await down.close();
    const failed = await sendDueMail(db, smtpSender({ SMTP_PORT: 587, SMTP_SECURE: 'false' }, deadPort), FROM);
    expect(failed.sent).toBe(0);
    expect(failed.failed).toBeGreaterThan(0);
    const waiting = await db('mail_outbox').where({ project_id: plan.project.id, kind: 'handover_returned' }).first();
    expect([waiting.sent_at, waiting.attempts, waiting.given_up]).toEqual([null, 1, false]);
    expect(waiting.last_error).toMatch(/ECONNREFUSED/);
    // not due again before its retry time
    const fake = await startFakeSmtp(db, 0);
    try {
      const sender = smtpSender({ SMTP_PORT: 587, SMTP_SECURE: 'false' }, fake.port);
      expect((await sendDueMail(db, sender, FROM)).sent).toBe(0);
      // the retry time comes (a restarted worker finds the row where it was left)
      await db('mail_outbox').whereNull('sent_at').update({ next_attempt_at: db.raw("now() - interval '1 second'") });
      const r = await sendDueMail(db, sender, FROM);
      expect(r.failed).toBe(0);
      expect(r.sent).toBeGreaterThanOrEqual(2);
      expect(Number((await db('mail_outbox').whereNull('sent_at').where({ given_up: false }).count('* as n').first())!.n)).toBe(0);
      const got = await db('mail_received').where('subject', `${plan.project.name}: handover revision 1 returned`);
      expect(got).toHaveLength(1);
      expect([...got[0].envelope_to].sort()).toEqual([plan.admin.email, plan.engineer.email].sort());
      expect(got[0].envelope_from).toBe('trenchbook@test.example');
      expect(got[0].body).toContain('- Section S-1 0–120 m: The depth readings at 60 m are missing.');
      expect(got[0].body).toContain('- The package as a whole: Add the crossings\' photos.');
      // sent once: nothing more to send
      expect((await sendDueMail(db, sender, FROM)).sent).toBe(0);
    } finally {
      await fake.close();
    }
  });

  it('gives a message up after the last attempt, keeping its error', async () => {
    const [row] = await db('mail_outbox').insert({ kind: 'reset', to_addresses: ['nobody@test.example'], subject: 'x', body: 'x', attempts: MAX_ATTEMPTS - 1 }).returning('id');
    const down = await startFakeSmtp(db, 0);
    await down.close();
    await sendDueMail(db, smtpSender({ SMTP_PORT: 587, SMTP_SECURE: 'false' }, down.port), FROM);
    const r = await db('mail_outbox').where({ id: row.id }).first();
    expect([r.attempts, r.given_up, r.sent_at]).toEqual([MAX_ATTEMPTS, true, null]);
  });

  it('an invitation queues an e-mail carrying the one-time link, in the transaction that makes the user', async () => {
    const admin = await makePrincipal(db, 'admin', 'contractor');
    const email = `invited-${randomUUID().slice(0, 8)}@test.example`;
    const { onboarding } = await createUser(db, admin, createUserSchema.parse({ email, name: 'Ada Invited', role: 'surveyor' }), 72);
    expect(onboarding.linkPath).toMatch(/^\/welcome\/tbl_/);
    // a refused user (duplicate e-mail) queues nothing
    const before = await count(db, 'mail_outbox');
    await refusal(createUser(db, admin, createUserSchema.parse({ email, name: 'Ada Again', role: 'surveyor' }), 72));
    expect(await count(db, 'mail_outbox')).toBe(before);
    const fake = await startFakeSmtp(db, 0);
    try {
      await sendDueMail(db, smtpSender({ SMTP_PORT: 587, SMTP_SECURE: 'false' }, fake.port), FROM);
    } finally {
      await fake.close();
    }
    const got = await db('mail_received').whereRaw('? = ANY(envelope_to)', [email]);
    expect(got.map((g) => g.subject)).toEqual(['Your Trenchbook account']);
    expect(got[0].body).toContain(`${appUrl()}${onboarding.linkPath}`);
    expect(got[0].body).toContain(admin.name);
    // /admin/mail: the inviting organisation's admin reads it; another organisation's admin does not
    expect((await listOutbox(db, admin.organisationId)).filter((m) => m.to.includes(email)).map((m) => [m.subject, m.sentAt !== null])).toEqual([['Your Trenchbook account', true]]);
    expect((await listOutbox(db, plan.owner.organisationId)).some((m) => m.to.includes(email))).toBe(false);
    // the owner's admin reads the e-mails about its project sent to the contractor
    expect((await listOutbox(db, plan.owner.organisationId)).map((m) => m.subject)).toContain(`${plan.project.name}: handover revision 1 returned`);
  });
});
