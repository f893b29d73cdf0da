import type { Metadata } from 'next';
import Link from 'next/link';
import { getDb } from '@/db/client';
import { listRecentJobs } from '@/db/jobs';
import { listOrgChanges } from '@/db/org-changes';
import { listCurrentSections } from '@/db/sections';
import { listUploads } from '@/db/uploads';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { formatLength } from '@/lib/records/units';
import { ACCURACY_CLASS_LABELS } from '@/lib/records/accuracy-classes';
import { STATUS_STYLE, type SectionStatusKey } from '@/lib/records/section-status';
import { sectionTotals } from '@/lib/services/reconcile';
import { Badge, Card, Notice, PageHeader } from '@/components/ui/primitives';
import { plural } from '@/components/ui/upload-words';

export const metadata: Metadata = { title: 'Project' };

const JOB_WORDS: Record<string, string> = { reconcile: 'Planned against built', 'audit-export': 'Activity log export' };
const JOB_TONE = { queued: 'muted', running: 'info', completed: 'ok', failed: 'bad' } as const;
const UPLOAD_TONE = { stored: 'ok', failed: 'bad', withdrawn: 'muted', superseded: 'muted' } as const;
const UPLOAD_WORD = { stored: 'stored', failed: 'refused', withdrawn: 'withdrawn', superseded: 'superseded' } as const;

/** Kilometres once there are more than a thousand metres: "1.24 km", "640 m". */
function distance(m: number, unitSystem: 'metric' | 'imperial'): string {
  if (unitSystem === 'imperial') return `${Math.round(m / 0.3048).toLocaleString('en-GB')} ft`;
  return m >= 1000 ? `${(m / 1000).toFixed(2)} km` : `${Math.round(m)} m`;
}

export default async function ProjectPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { me, project } = await requireProjectPage(projectId);
  const db = getDb();
  const [sections, uploads, jobs, pending] = await Promise.all([
    listCurrentSections(db, project.id),
    listUploads(db, project.id),
    listRecentJobs(db, project.id, 5),
    listOrgChanges(db, project.id, true),
  ]);
  const totals = sectionTotals(sections);
  const onPlan = sections.filter((s) => s.plannedRouteRef !== null);
  const approvedM = onPlan.filter((s) => s.review === 'approved' && s.status !== 'not_built').reduce((n, s) => n + (s.toChainageM - s.fromChainageM), 0);
  const byStatus = (Object.keys(STATUS_STYLE) as SectionStatusKey[]).map((k) => {
    const of = sections.filter((s) => s.status === k);
    return { key: k, count: of.length, metres: of.reduce((n, s) => n + s.lengthM, 0) };
  });
  const toReview = sections.filter((s) => s.review === 'pending' || s.review === 'rejected').length;
  const pct = (m: number) => (totals.plannedM > 0 ? Math.min(100, (100 * m) / totals.plannedM) : 0);
  const fmt = new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'short', timeZone: project.timeZone });
  const base = `/projects/${project.id}`;

  const settings: [string, string][] = [
    ['Network owner', project.ownerOrgName],
    ['Contractor', project.contractorOrgName],
    ['Coordinate system', project.defaultCrs],
    ['Time zone', project.timeZone],
    ['Minimum cover depth', formatLength(project.minCoverDepthM, project.unitSystem)],
    ['Lateral tolerance', formatLength(project.lateralToleranceM, project.unitSystem)],
    ['Usual survey accuracy', ACCURACY_CLASS_LABELS[project.defaultAccuracyClass]],
  ];

  return (
    <>
      <PageHeader
        title={project.name}
        subtitle={project.areaName || undefined}
        actions={
          can(me.role, 'upload.create') ? (
            <Link href={`${base}/uploads`} className="rounded-md bg-brand px-3.5 py-2 text-sm font-medium text-white no-underline hover:bg-brand-dark hover:no-underline">
              Add field uploads
            </Link>
          ) : undefined
        }
      />
      <div className="space-y-6">
        {pending.map((c) => (
          <Notice key={c.id} tone="warn">
            {c.proposedByOrgName} proposed to change the {c.side === 'owner' ? 'network owner' : 'contractor'} from {c.fromOrgName} to {c.toOrgName}. Nothing
            changes until an admin of {c.proposedByOrgId === project.ownerOrgId ? project.contractorOrgName : project.ownerOrgName} confirms it
            {can(me.role, 'project.manage') ? (
              <>
                {' '}
                in <Link href={`${base}/settings`}>the settings</Link>
              </>
            ) : null}
            .
          </Notice>
        ))}

        <Card title="Progress">
          {totals.plannedM === 0 ? (
            <p className="text-sm text-ink-soft">
              No planned network yet. <Link href={`${base}/plan`}>Import the design</Link> to follow what is built against it.
            </p>
          ) : (
            <div className="space-y-4">
              <dl className="grid grid-cols-3 gap-3">
                {[
                  ['Planned', totals.plannedM],
                  ['Built', totals.builtM],
                  ['Approved', approvedM],
                ].map(([k, m]) => (
                  <div key={k as string}>
                    <dt className="text-xs uppercase tracking-wide text-ink-faint">{k}</dt>
                    <dd className="text-xl font-semibold tabular-nums">{distance(m as number, project.unitSystem)}</dd>
                    {k !== 'Planned' && <dd className="text-xs text-ink-soft">{pct(m as number).toFixed(0)} % of the plan</dd>}
                  </div>
                ))}
              </dl>
              <div
                role="img"
                aria-label={`Built ${pct(totals.builtM).toFixed(0)} % of the planned network, approved ${pct(approvedM).toFixed(0)} %.`}
                className="relative h-3 overflow-hidden rounded-full bg-paper-sunk"
              >
                <div className="absolute inset-y-0 left-0 bg-status-ok/40" style={{ width: `${pct(totals.builtM)}%` }} />
                <div className="absolute inset-y-0 left-0 bg-status-ok" style={{ width: `${pct(approvedM)}%` }} />
              </div>
              <p className="text-xs text-ink-soft">
                Dark: approved. Light: built, waiting for review. Built counts stretches of the plan laid as planned or deviating from it.
              </p>
            </div>
          )}
        </Card>

        <div className="grid gap-6 lg:grid-cols-2">
          <Card title="Sections by status" actions={<Link href={`${base}/reconciliation`} className="text-sm">Planned against built</Link>}>
            {sections.length === 0 ? (
              <p className="text-sm text-ink-soft">No sections yet: they appear after the first uploads are matched to the plan.</p>
            ) : (
              <>
                <ul className="space-y-2 text-sm">
                  {byStatus.map((b) => (
                    <li key={b.key} className="flex items-center justify-between gap-3">
                      <span className="flex items-center gap-2">
                        <span aria-hidden="true" className="inline-block h-2.5 w-2.5 rounded-full" style={{ background: STATUS_STYLE[b.key].colour }} />
                        {STATUS_STYLE[b.key].label}
                      </span>
                      <span className="tabular-nums text-ink-soft">
                        {plural(b.count, 'section')}, {distance(b.metres, project.unitSystem)}
                      </span>
                    </li>
                  ))}
                </ul>
                <p className="mt-3 text-sm">{toReview === 0 ? 'Every section is reviewed.' : `${plural(toReview, 'section')} still to review.`}</p>
              </>
            )}
          </Card>

          <Card title="Latest uploads" actions={<Link href={`${base}/uploads`} className="text-sm">All uploads</Link>}>
            {uploads.length === 0 ? (
              <p className="text-sm text-ink-soft">Nothing uploaded yet.</p>
            ) : (
              <ul className="divide-y divide-ink/5 text-sm">
                {uploads.slice(0, 5).map((u) => (
                  <li key={u.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
                    <span className="min-w-0 break-words">
                      <Link href={`${base}/uploads/${u.id}`}>{u.fileName}</Link>
                      <span className="block text-xs text-ink-soft">
                        {fmt.format(new Date(u.createdAt))}
                        {u.uploadedByName ? `, ${u.uploadedByName}` : ''} · {plural(u.pointCount, 'position')}
                      </span>
                    </span>
                    <Badge tone={UPLOAD_TONE[u.status]}>{UPLOAD_WORD[u.status]}</Badge>
                  </li>
                ))}
              </ul>
            )}
          </Card>

          <Card title="Latest background work">
            {jobs.length === 0 ? (
              <p className="text-sm text-ink-soft">Nothing has run yet.</p>
            ) : (
              <ul className="divide-y divide-ink/5 text-sm">
                {jobs.map((j) => (
                  <li key={j.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
                    <span className="min-w-0">
                      {JOB_WORDS[j.kind] ?? j.kind}
                      <span className="block text-xs text-ink-soft">
                        {fmt.format(new Date(j.createdAt))}
                        {j.message ? ` · ${j.message}` : ''}
                      </span>
                    </span>
                    <Badge tone={JOB_TONE[j.status]}>{j.status}</Badge>
                  </li>
                ))}
              </ul>
            )}
          </Card>

          <Card title="Settings" actions={can(me.role, 'project.manage') ? <Link href={`${base}/settings`} className="text-sm">Change</Link> : undefined}>
            <dl className="grid gap-x-6 gap-y-2 text-sm sm:grid-cols-2">
              {settings.map(([k, v]) => (
                <div key={k}>
                  <dt className="text-xs uppercase tracking-wide text-ink-faint">{k}</dt>
                  <dd>{v}</dd>
                </div>
              ))}
            </dl>
          </Card>
        </div>
      </div>
    </>
  );
}
