import type { Metadata } from 'next';
import { getDb } from '@/db/client';
import { listHandoverSummaries, sectionsOfProject, type HandoverComment, type HandoverSummary } from '@/db/handover-reviews';
import { listPlannedRoutes } from '@/db/planned';
import { requireProjectPage } from '@/lib/auth/page-guards';
import { can } from '@/lib/auth/roles';
import { Badge, Card, Notice, PageHeader } from '@/components/ui/primitives';
import { Cautions } from '@/components/ui/cautions';
import { HandoverAnswerForm, HandoverBuildForm, HandoverReviewForm } from '@/components/forms/handover-forms';

export const metadata: Metadata = { title: 'Handover' };

const STATUS: Record<HandoverSummary['status'], { label: string; tone: 'ok' | 'warn' | 'bad' | 'info' | 'muted' }> = {
  building: { label: 'building', tone: 'info' },
  issued: { label: 'issued, waiting for review', tone: 'warn' },
  failed: { label: 'build failed', tone: 'bad' },
  accepted: { label: 'accepted', tone: 'ok' },
  returned: { label: 'returned', tone: 'bad' },
};

const when = (iso: string | null) => (iso ? `${iso.slice(0, 16).replace('T', ' ')} UTC` : '—');
const size = (b: number | null) => (b === null ? '—' : b < 1024 * 1024 ? `${(b / 1024).toFixed(1)} KB` : `${(b / 1024 / 1024).toFixed(1)} MB`);
const isObj = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

/** Words for the change report's keys (written by the package builder); other keys show as they are. */
const CHANGE_WORDS: Record<string, string> = {
  added: 'added', removed: 'removed', changed: 'changed', gained: 'gained', lost: 'lost',
  sectionsAdded: 'Sections added', sectionsRemoved: 'Sections removed', sectionsChanged: 'Sections changed',
  passedGained: 'Households passed gained', passedLost: 'Households passed lost', previousRevision: 'Compared with revision',
};
const countOf = (v: unknown): string => (v === null ? '—' : Array.isArray(v) ? String(v.length) : typeof v === 'number' || typeof v === 'string' ? String(v) : isObj(v) ? Object.entries(v).map(([k, x]) => `${CHANGE_WORDS[k] ?? k} ${countOf(x)}`).join(', ') : '—');

function ChangeReport({ report }: { report: unknown }) {
  if (!isObj(report)) return <p className="text-sm text-ink-soft">The first revision: nothing to compare with.</p>;
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm" aria-label="Changes against the previous revision">
      {Object.entries(report).map(([k, v]) => (
        <div key={k} className="contents">
          <dt className="text-ink-faint">{CHANGE_WORDS[k] ?? k}</dt>
          <dd>{countOf(v)}</dd>
        </div>
      ))}
    </dl>
  );
}

/** The manifest's accuracy statement (the first text under a key naming accuracy). */
/** The manifest's accuracy statement in one line: metres by source class with their 95 % radii. */
function accuracyOf(manifest: unknown): string | null {
  if (!isObj(manifest) || !isObj(manifest.positionalAccuracy)) return null;
  const by = manifest.positionalAccuracy.bySource;
  if (!Array.isArray(by) || by.length === 0) return null;
  return by
    .filter(isObj)
    .map((g) => {
      const r = isObj(g.radius95) ? (g.radius95.min === g.radius95.max ? ` ±${g.radius95.min} m` : ` ±${g.radius95.min}–${g.radius95.max} m`) : ', radius unknown';
      return `${String(g.source)}: ${Number(g.metres).toFixed(1)} m${r}`;
    })
    .join(' · ');
}

function Comments({ comments, title }: { comments: HandoverComment[]; title: string }) {
  const owner = comments.filter((c) => c.kind === 'return');
  if (owner.length === 0) return null;
  return (
    <div className="space-y-2">
      <h3 className="text-sm font-semibold">{title}</h3>
      <ul className="space-y-2" aria-label={title}>
        {owner.map((c) => (
          <li key={c.id} className="rounded-md border border-ink/10 p-2 text-sm">
            <p><span className="font-medium">{c.sectionLabel ? `Section ${c.sectionLabel}` : 'The package as a whole'}</span>: {c.text}</p>
            <p className="text-xs text-ink-faint">{c.authorName ?? 'someone'}, {when(c.createdAt)}</p>
            {comments.filter((a) => a.answersId === c.id).map((a) => (
              <p key={a.id} className="mt-1 border-l-2 border-brand pl-2">
                <span className="text-xs text-ink-faint">Answer by {a.authorName ?? 'someone'}, {when(a.createdAt)}: </span>{a.text}
              </p>
            ))}
          </li>
        ))}
      </ul>
    </div>
  );
}

/**
 * The project's handover packages: the contractor builds a revision, the network owner accepts it or returns
 * it with comments, the contractor answers them with the next revision.
 */
export default async function HandoverPage({ params }: { params: Promise<{ projectId: string }> }) {
  const { projectId } = await params;
  const { me, project } = await requireProjectPage(projectId, 'handover.read');
  const db = getDb();
  const [handovers, routes] = await Promise.all([listHandoverSummaries(db, project.id), listPlannedRoutes(db, project.id)]);
  const builder = can(me.role, 'handover.build') && me.organisationId === project.contractorOrgId;
  const reviewer = can(me.role, 'handover.review') && me.organisationId === project.ownerOrgId;
  const labels = await sectionsOfProject(db, project.id, [...new Set(handovers.flatMap((h) => h.sectionIds))]);

  return (
    <>
      <PageHeader title="Handover" subtitle={`What ${project.contractorOrgName} hands over to ${project.ownerOrgName}: each package is a revision, accepted or returned with comments.`} />
      <Cautions kinds={['digging']} />
      {builder && (
        <Card title="Build a new revision">
          <HandoverBuildForm projectId={project.id} routes={routes.map((r) => ({ ref: r.ref, name: r.street ?? '' }))} projectCrs={project.defaultCrs && project.defaultCrs !== 'EPSG:4326' ? project.defaultCrs : null} />
        </Card>
      )}
      {handovers.length === 0 ? <Notice>No package has been built yet.</Notice> : null}
      <ol className="space-y-4" aria-label="Revisions">
        {handovers.map((h, i) => {
          const previous = handovers[i + 1];
          const accuracy = accuracyOf(h.manifest);
          const open = h.comments.filter((c) => c.kind === 'return' && !h.comments.some((a) => a.answersId === c.id));
          return (
            <li key={h.id}>
              <Card title={`Revision ${h.revision}`} actions={<Badge tone={STATUS[h.status].tone}>{STATUS[h.status].label}</Badge>}>
                <div className="space-y-3">
                  <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
                    <dt className="text-ink-faint">Built by</dt><dd>{h.createdByName ?? '—'}, {when(h.createdAt)}</dd>
                    {h.issuedAt && (<><dt className="text-ink-faint">Issued</dt><dd>{when(h.issuedAt)}</dd></>)}
                    <dt className="text-ink-faint">File</dt>
                    <dd className="break-all">
                      {h.fileName ? <a href={`/api/handovers/${h.id}/download`}>{h.fileName}</a> : '—'} ({size(h.sizeBytes)})
                    </dd>
                    {h.note && (<><dt className="text-ink-faint">Note</dt><dd>{h.note}</dd></>)}
                    {h.failureReason && (<><dt className="text-ink-faint">Why it failed</dt><dd>{h.failureReason}</dd></>)}
                    {h.reviewedAt && (<><dt className="text-ink-faint">Reviewed</dt><dd>{h.status === 'accepted' ? 'Accepted' : 'Returned'} by {h.reviewedByName ?? '—'}, {when(h.reviewedAt)}</dd></>)}
                  </dl>
                  {accuracy && <p className="text-sm"><span className="font-medium">Accuracy (95 % radius) by source: </span>{accuracy}</p>}
                  {h.status !== 'building' && h.status !== 'failed' && (
                    <div>
                      <h3 className="text-sm font-semibold">Changes against {previous ? `revision ${previous.revision}` : 'nothing (first revision)'}</h3>
                      <ChangeReport report={h.changeReport} />
                    </div>
                  )}
                  {previous && previous.status === 'returned' && <Comments comments={previous.comments} title={`Answers the comments on revision ${previous.revision}`} />}
                  <Comments comments={h.comments} title="The network owner's comments" />
                  {builder && h.status === 'returned' && open.length > 0 && (
                    <HandoverAnswerForm handoverId={h.id} comments={open.map((c) => ({ id: c.id, label: c.sectionLabel ? `section ${c.sectionLabel}` : 'the package', text: c.text }))} />
                  )}
                  {reviewer && h.status === 'issued' && (
                    <HandoverReviewForm handoverId={h.id} revision={h.revision} sections={h.sectionIds.filter((id) => labels.has(id)).map((id) => ({ id, label: labels.get(id)! }))} />
                  )}
                </div>
              </Card>
            </li>
          );
        })}
      </ol>
    </>
  );
}
