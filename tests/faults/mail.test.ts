import { createServer } from 'node:net';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/client';
import { enqueueMail } from '@/lib/mail/outbox';
import { startWorker, waitFor, type Proc } from './processes';

// The e-mail outbox (issue 16): a message written while the SMTP server is down, whose worker is then killed,
// is sent exactly once by the next worker.

const db = getDb();
const workers: Proc[] = [];
afterAll(async () => {
  for (const w of workers) await w.stop();
  await closeDb();
});

/** A port nothing listens on (taken from the system, then released). */
async function closedPort(): Promise<number> {
  const srv = createServer();
  await new Promise<void>((r) => srv.listen(0, '127.0.0.1', () => r()));
  const port = (srv.address() as { port: number }).port;
  await new Promise<void>((r) => srv.close(() => r()));
  return port;
}

describe('an e-mail survives an SMTP server that is down and a worker killed', () => {
  it('fails and waits while SMTP refuses; after kill -9 and a restart the next worker sends it once', async () => {
    const subject = `fault mail ${Date.now()}`;
    const w1 = await startWorker({ SMTP_HOST: '127.0.0.1', SMTP_PORT: String(await closedPort()) });
    workers.push(w1);
    const id = await db.transaction((trx) => enqueueMail(trx, { kind: 'reset', to: ['fault@test.example'], subject, body: 'kept across a restart' }));
    const row = () => db('mail_outbox').where({ id }).first();
    await waitFor('a refused attempt', async () => ((await row()).attempts >= 1 ? true : undefined), 30_000, 100);
    await w1.kill9();
    const failed = await row();
    expect([failed.sent_at, failed.given_up]).toEqual([null, false]);
    expect(failed.last_error).toMatch(/ECONNREFUSED/);
    // the retry time comes while no worker runs
    await db('mail_outbox').where({ id }).update({ next_attempt_at: db.raw("now() - interval '1 second'") });

    // no SMTP configured now: the new worker's fake server receives it
    const w2 = await startWorker();
    workers.push(w2);
    await waitFor('the message sent', async () => ((await row()).sent_at ? true : undefined), 30_000, 100);
    const got = await db('mail_received').where({ subject });
    expect(got.map((g) => [g.envelope_to, g.body.trim()])).toEqual([[['fault@test.example'], 'kept across a restart']]);
    expect(w2.output()).toMatch(/fake SMTP server on 127\.0\.0\.1:\d+/);
  });
});
