import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import type { Db } from '@/db/client';

// The local fake SMTP server (development and tests, when no SMTP is configured): it runs in the worker's
// process, accepts every message on 127.0.0.1 and keeps it in `mail_received`, so what arrived survives a
// restart and the tests read it from the database.

export interface FakeSmtp {
  port: number;
  close(): Promise<void>;
}

export async function startFakeSmtp(db: Db, port = 0): Promise<FakeSmtp> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    logger: false,
    banner: 'Trenchbook fake SMTP server: nothing leaves this machine',
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('end', () => {
        const raw = Buffer.concat(chunks).toString('utf8');
        simpleParser(raw)
          .then((parsed) =>
            db('mail_received').insert({
              envelope_from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
              envelope_to: session.envelope.rcptTo.map((r) => r.address),
              subject: parsed.subject ?? '',
              body: parsed.text ?? '',
              raw,
            }),
          )
          .then(() => callback(), (err: Error) => callback(err));
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', () => resolve());
  });
  const address = server.server.address();
  const bound = typeof address === 'object' && address ? address.port : port;
  return { port: bound, close: () => new Promise<void>((resolve) => server.close(() => resolve())) };
}

export interface ReceivedMail {
  id: number;
  from: string;
  to: string[];
  subject: string;
  body: string;
  receivedAt: string;
}

export async function listReceived(db: Db, limit = 100): Promise<ReceivedMail[]> {
  const rows = await db('mail_received').orderBy('id', 'desc').limit(limit);
  return rows.map((r) => ({ id: Number(r.id), from: r.envelope_from, to: r.envelope_to, subject: r.subject, body: r.body, receivedAt: r.received_at.toISOString() }));
}
