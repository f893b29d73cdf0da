import type { Metadata } from 'next';
import Link from 'next/link';
import { getDb } from '@/db/client';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { projectChecks } from '@/lib/services/quality-checks';
import { Badge, Card, Notice, PageHeader } from '@/components/ui/primitives';
import { Cautions } from '@/components/ui/cautions';

export const metadata: Metadata = { title: 'Quality checks' };

export default async function ChecksPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { project } = await requireProjectPage(projectId, 'check.read');
  const { checks } = await projectChecks(getDb(), project);
  const open = checks.reduce((n, c) => n + c.count, 0);
  return (
    <>
      <PageHeader
        title="Quality checks"
        subtitle={open === 0 ? 'Every check passes on the records as they stand.' : `${open} finding${open === 1 ? '' : 's'} to look at. An engineer approving a section with an open check confirms it with a comment.`}
      />
      <div className="space-y-4">
        <Cautions kinds={['digging']} />
        {checks.map((c) => (
          <Card
            key={c.check}
            title={
              <span className="flex items-center gap-2">
                {c.label}
                <Badge tone={c.count === 0 ? 'ok' : c.severity === 'fail' ? 'bad' : 'warn'}>{c.count === 0 ? 'passes' : `${c.count} open`}</Badge>
              </span>
            }
          >
            {c.count === 0 ? (
              <p className="text-sm text-ink-soft">Nothing found.</p>
            ) : (
              <ul className="space-y-2 text-sm" aria-label={c.label}>
                {c.findings.map((f, i) => (
                  <li key={`${f.recordId ?? f.routeRef}-${f.fromChainageM}-${i}`} className="flex flex-wrap items-baseline gap-2">
                    <span>{f.message}</span>
                    <Link href={f.href} className="min-h-10 underline">
                      Open
                    </Link>
                  </li>
                ))}
              </ul>
            )}
          </Card>
        ))}
        {checks.length === 0 && <Notice>No checks are defined.</Notice>}
      </div>
    </>
  );
}
