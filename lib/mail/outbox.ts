import type { Knex } from 'knex';
import type { Db } from '@/db/client';
import { env } from '@/lib/env';

// The outbox (issue 16): every e-mail is written to `mail_outbox` in the transaction of the change it tells
// of, and sent afterwards by `sendDueMail` (the worker's mail loop) with retries. A restart between the two,
// or an SMTP server that is down for a while, loses nothing: the row waits until it is sent.

export type MailKind = 'handover_issued' | 'handover_accepted' | 'handover_returned' | 'invitation' | 'reset';

export interface OutgoingMail {
  kind: MailKind;
  to: string[];
  subject: string;
  body: string;
  projectId?: string | null;
}

/** After this many failed attempts a message is given up (kept with its last error for the admin page). */
export const MAX_ATTEMPTS = 8;

/** Wait before attempt n + 1 after n failures: 30 s, 1 min, 2 min, … at most an hour. */
export const retryDelaySeconds = (failures: number) => Math.min(3600, 30 * 2 ** Math.max(0, failures - 1));

/** The address links in e-mails point at. */
export function appUrl(): string {
  const e = env();
  return (e.APP_URL ?? e.NEXTAUTH_URL ?? 'http://127.0.0.1:3000').replace(/\/+$/, '');
}

/** Queues one message; call it inside the transaction that makes the change. Nobody to tell: nothing queued. */
export async function enqueueMail(trx: Db | Knex.Transaction, m: OutgoingMail): Promise<number | null> {
  const to = [...new Set(m.to.map((a) => a.trim()).filter(Boolean))];
  if (to.length === 0) return null;
  const [row] = await trx('mail_outbox').insert({ kind: m.kind, to_addresses: to, subject: m.subject, body: m.body, project_id: m.projectId ?? null }).returning('id');
  return Number(row.id);
}

export interface Sender {
  sendMail(m: { from: string; to: string[]; subject: string; text: string }): Promise<{ messageId?: string }>;
}

export interface SendResult {
  sent: number;
  failed: number;
}

/**
 * Sends what is due, oldest first, each in a transaction of its own holding its row (SKIP LOCKED: two
 * workers never send the same message). A failure counts an attempt and sets the next one later.
 */
export async function sendDueMail(db: Db, sender: Sender, from: string, limit = 20): Promise<SendResult> {
  const out: SendResult = { sent: 0, failed: 0 };
  for (let i = 0; i < limit; i++) {
    const done = await db.transaction(async (trx) => {
      const row = await trx('mail_outbox')
        .whereNull('sent_at').where({ given_up: false }).where('next_attempt_at', '<=', trx.fn.now())
        .orderBy('id').forUpdate().skipLocked().first();
      if (!row) return 'none' as const;
      try {
        const info = await sender.sendMail({ from, to: row.to_addresses, subject: row.subject, text: row.body });
        await trx('mail_outbox').where({ id: row.id }).update({ sent_at: trx.fn.now(), attempts: row.attempts + 1, last_error: null, message_id: info.messageId ?? null });
        return 'sent' as const;
      } catch (err) {
        const attempts = row.attempts + 1;
        await trx('mail_outbox').where({ id: row.id }).update({
          attempts,
          last_error: String((err as Error).message ?? err).slice(0, 1000),
          given_up: attempts >= MAX_ATTEMPTS,
          next_attempt_at: trx.raw(`now() + make_interval(secs => ?)`, [retryDelaySeconds(attempts)]),
        });
        return 'failed' as const;
      }
    });
    if (done === 'none') break;
    out[done] += 1;
  }
  return out;
}

export interface OutboxEntry {
  id: number;
  kind: string;
  to: string[];
  subject: string;
  body: string;
  createdAt: string;
  sentAt: string | null;
  attempts: number;
  lastError: string | null;
  givenUp: boolean;
}

/**
 * The last messages an organisation's admin may read, newest first, for /admin/mail: those to its own people,
 * and those about projects it is the owner or contractor of. Another organisation's invitation links stay
 * with that organisation.
 */
export async function listOutbox(db: Db, organisationId: string, limit = 100): Promise<OutboxEntry[]> {
  const rows = await db('mail_outbox as m')
    .where((q) => {
      q.whereExists(db('users as u').where('u.organisation_id', organisationId).whereRaw('u.email = ANY(m.to_addresses)').select(db.raw('1')))
        .orWhereExists(
          db('projects as p').whereRaw('p.id = m.project_id').where((w) => w.where('p.owner_org_id', organisationId).orWhere('p.contractor_org_id', organisationId)).select(db.raw('1')),
        );
    })
    .orderBy('m.id', 'desc').limit(limit).select('m.*');
  return rows.map((r) => ({
    id: Number(r.id), kind: r.kind, to: r.to_addresses, subject: r.subject, body: r.body, createdAt: r.created_at.toISOString(),
    sentAt: r.sent_at ? r.sent_at.toISOString() : null, attempts: r.attempts, lastError: r.last_error, givenUp: r.given_up,
  }));
}
