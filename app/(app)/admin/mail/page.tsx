import type { Metadata } from 'next';
import { getDb } from '@/db/client';
import { requirePrincipal } from '@/lib/auth/session';
import { can } from '@/lib/auth/roles';
import { env } from '@/lib/env';
import { listOutbox } from '@/lib/mail/outbox';
import { smtpConfigured } from '@/lib/mail/transport';
import { Badge, Card, Notice, PageHeader } from '@/components/ui/primitives';

export const metadata: Metadata = { title: 'E-mail' };
export const dynamic = 'force-dynamic';

const when = (iso: string) => `${iso.slice(0, 16).replace('T', ' ')} UTC`;

export default async function MailPage() {
  const me = await requirePrincipal();
  if (!can(me.role, 'mail.read')) return <Notice tone="bad">Only administrators read the e-mail the server sent.</Notice>;
  const messages = await listOutbox(getDb(), me.organisationId, 100);
  const fake = !smtpConfigured(env());
  return (
    <>
      <PageHeader
        title="E-mail"
        subtitle={fake
          ? 'No SMTP server is configured: every message goes to the local fake SMTP server and stays on this machine. The last 100 to your people or about your projects.'
          : 'The last 100 messages to your people or about your projects, with their state.'}
      />
      {messages.length === 0 ? <Notice>No e-mail yet.</Notice> : null}
      <ul className="space-y-3" aria-label="Messages">
        {messages.map((m) => (
          <li key={m.id}>
            <Card
              title={<span className="break-words">{m.subject}</span>}
              actions={m.sentAt ? <Badge tone="ok">sent</Badge> : m.givenUp ? <Badge tone="bad">given up</Badge> : <Badge tone="warn">waiting</Badge>}
            >
              <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
                <dt className="text-ink-faint">To</dt>
                <dd className="break-all">{m.to.join(', ')}</dd>
                <dt className="text-ink-faint">Written</dt>
                <dd>{when(m.createdAt)}</dd>
                {m.sentAt ? (<><dt className="text-ink-faint">Sent</dt><dd>{when(m.sentAt)}</dd></>) : null}
                {!m.sentAt && m.attempts > 0 ? (<><dt className="text-ink-faint">Attempts</dt><dd>{m.attempts}{m.lastError ? `: ${m.lastError}` : ''}</dd></>) : null}
              </dl>
              <pre className="mt-2 whitespace-pre-wrap break-words font-sans text-sm">{m.body}</pre>
            </Card>
          </li>
        ))}
      </ul>
    </>
  );
}
