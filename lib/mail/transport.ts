import nodemailer from 'nodemailer';
import type { Env } from '@/lib/env';
import type { Sender } from './outbox';

/** True when SMTP is configured (SMTP_URL or SMTP_HOST); otherwise the local fake SMTP server is used. */
export const smtpConfigured = (e: Pick<Env, 'SMTP_URL' | 'SMTP_HOST'>) => Boolean(e.SMTP_URL || e.SMTP_HOST);

/** A nodemailer SMTP transport from the environment, or to the fake server at `fakePort` on 127.0.0.1. */
export function smtpSender(e: Pick<Env, 'SMTP_URL' | 'SMTP_HOST' | 'SMTP_PORT' | 'SMTP_SECURE' | 'SMTP_USER' | 'SMTP_PASS'>, fakePort?: number): Sender {
  if (e.SMTP_URL) return nodemailer.createTransport(e.SMTP_URL);
  if (e.SMTP_HOST) {
    return nodemailer.createTransport({
      host: e.SMTP_HOST, port: e.SMTP_PORT, secure: e.SMTP_SECURE === 'true',
      auth: e.SMTP_USER ? { user: e.SMTP_USER, pass: e.SMTP_PASS ?? '' } : undefined,
    });
  }
  if (fakePort === undefined) throw new Error('No SMTP configured and no fake SMTP server running.');
  // the fake server speaks plain SMTP on the loopback only
  return nodemailer.createTransport({ host: '127.0.0.1', port: fakePort, secure: false, ignoreTLS: true });
}
