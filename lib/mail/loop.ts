import type { Db } from '@/db/client';
import { env } from '@/lib/env';
import { startFakeSmtp, type FakeSmtp } from './fake-smtp';
import { sendDueMail } from './outbox';
import { smtpConfigured, smtpSender } from './transport';

/**
 * The worker's mail loop: sends what waits in the outbox every MAIL_INTERVAL_SECONDS. Without SMTP settings
 * it starts the local fake SMTP server in this process first and sends to it. Returns how to stop, and a
 * line saying where the mail goes (the worker prints it).
 */
export async function startMailLoop(db: Db): Promise<{ stop: () => Promise<void>; where: string }> {
  const e = env();
  let fake: FakeSmtp | undefined;
  if (!smtpConfigured(e)) {
    try {
      fake = await startFakeSmtp(db, e.MAIL_FAKE_PORT);
    } catch (err) {
      // another process (a second checkout's worker) holds the port: any free one will do
      if ((err as NodeJS.ErrnoException).code !== 'EADDRINUSE') throw err;
      console.error(`[trenchbook] mail: port ${e.MAIL_FAKE_PORT} is taken; the fake SMTP server takes a free one`);
      fake = await startFakeSmtp(db, 0);
    }
  }
  const sender = smtpSender(e, fake?.port);
  let running = false;
  const tick = async () => {
    if (running) return;
    running = true;
    try {
      await sendDueMail(db, sender, e.MAIL_FROM);
    } catch (err) {
      console.error('[trenchbook] mail: sending failed, will try again', err instanceof Error ? err.message : err);
    } finally {
      running = false;
    }
  };
  const timer = setInterval(tick, e.MAIL_INTERVAL_SECONDS * 1000);
  void tick();
  const where = fake
    ? `mail: no SMTP configured; a fake SMTP server on 127.0.0.1:${fake.port} keeps every message (read them at /admin/mail)`
    : `mail: sent through ${e.SMTP_URL ? new URL(e.SMTP_URL).host : `${e.SMTP_HOST}:${e.SMTP_PORT}`}`;
  return {
    where,
    stop: async () => {
      clearInterval(timer);
      await fake?.close();
    },
  };
}
