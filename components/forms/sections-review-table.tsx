'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { DataTable, type Column, type Row } from '@/components/ui/data-table';
import { Button, Field, Input, Notice } from '@/components/ui/primitives';
import { callApi } from './api-client';

export interface SectionRowMeta {
  status: 'as_planned' | 'deviates' | 'unplanned' | 'not_built';
  review: 'pending' | 'approved' | 'rejected' | 'acknowledged';
  label: string;
}

type Decision = 'approve' | 'acknowledge' | 'reject';
const DONE: Record<Decision, string> = { approve: 'approved', acknowledge: 'acknowledged as not built', reject: 'rejected' };

/**
 * The sections table; for a reviewer, rows are picked with checkboxes (or every as-planned section the
 * filter shows at once) and reviewed together in one request: approve built stretches, acknowledge
 * not-built ones with the reason, or reject with the reason.
 */
export function SectionsReviewTable({ projectId, columns, rows, meta, reviewer }: { projectId: string; columns: Column[]; rows: Row[]; meta: Record<string, SectionRowMeta>; reviewer: boolean }) {
  const router = useRouter();
  const [selected, setSelected] = useState<Set<string>>(new Set());
  const [comment, setComment] = useState('');
  const [error, setError] = useState<string | null>(null);
  const [details, setDetails] = useState<string[]>([]);
  const [done, setDone] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const picked = [...selected].filter((id) => meta[id]);
  const notBuilt = picked.filter((id) => meta[id].status === 'not_built').length;
  const canApprove = picked.length > 0 && notBuilt === 0;
  const canAcknowledge = picked.length > 0 && notBuilt === picked.length;

  async function decide(decision: Decision, ids: string[]) {
    setBusy(true);
    const res = await callApi<{ reviewed: number }>(`/api/projects/${projectId}/sections/review`, 'POST', { sectionIds: ids, decision, comment });
    setBusy(false);
    if (!res.ok) {
      setDone(null);
      setError(res.fieldErrors.comment ?? res.message);
      setDetails(Object.entries(res.fieldErrors).filter(([k]) => k !== 'comment').map(([, v]) => v));
      return;
    }
    setError(null);
    setDetails([]);
    setDone(`${res.data.reviewed} section${res.data.reviewed === 1 ? '' : 's'} ${DONE[decision]}.`);
    setSelected(new Set());
    setComment('');
    router.refresh();
  }

  if (!reviewer) return <DataTable label="Sections" empty="No sections yet: import the plan, upload what was laid, then reconcile." columns={columns} rows={rows} />;

  return (
    <div className="space-y-3">
      <DataTable
        label="Sections"
        empty="No sections yet: import the plan, upload what was laid, then reconcile."
        columns={columns}
        rows={rows}
        selection={{ selected, onChange: setSelected, rowLabel: (r) => `Select ${meta[r.id]?.label ?? r.id}` }}
        toolbar={(shown) => {
          const asPlanned = shown.filter((r) => meta[r.id]?.status === 'as_planned' && meta[r.id]?.review !== 'approved').map((r) => r.id);
          if (asPlanned.length === 0) return <p className="text-sm text-ink-soft">Every as-planned section shown is approved.</p>;
          return (
            <div className="flex flex-wrap items-center gap-2 text-sm">
              <Button type="button" variant="secondary" onClick={() => setSelected(new Set(asPlanned))}>
                Pick the {asPlanned.length} as-planned section{asPlanned.length === 1 ? '' : 's'} shown, not yet approved
              </Button>
              <Button type="button" disabled={busy} onClick={() => decide('approve', asPlanned)}>
                Approve {asPlanned.length === 1 ? 'it' : `all ${asPlanned.length}`}
              </Button>
            </div>
          );
        }}
      />
      <div className="rounded-lg border border-ink/10 bg-paper-sunk p-3" role="group" aria-label="Review the picked sections">
        <p className="mb-2 text-sm font-medium">
          {picked.length === 0 ? 'Pick sections in the table to review them together.' : `${picked.length} picked${notBuilt ? `, ${notBuilt} of them not built` : ''}.`}
        </p>
        <div className="grid gap-3 sm:grid-cols-[1fr_auto] sm:items-end">
          <Field label="Comment (the reason, to reject or acknowledge; to approve sections with open quality checks)" htmlFor="bulk-comment" error={error ?? undefined}>
            <Input id="bulk-comment" value={comment} onChange={(e) => setComment(e.target.value)} aria-invalid={!!error} placeholder="e.g. not built: the owner withdrew the address" />
          </Field>
          <div className="flex flex-wrap gap-2">
            <Button type="button" disabled={!canApprove || busy} onClick={() => decide('approve', picked)} title={notBuilt ? 'A not-built stretch has nothing laid to approve: acknowledge it instead.' : undefined}>Approve</Button>
            <Button type="button" variant="secondary" disabled={!canAcknowledge || busy} onClick={() => decide('acknowledge', picked)}>Acknowledge not built</Button>
            <Button type="button" variant="danger" disabled={picked.length === 0 || busy} onClick={() => decide('reject', picked)}>Reject</Button>
          </div>
        </div>
        {picked.length > 0 && notBuilt > 0 && notBuilt < picked.length && (
          <p className="mt-2 text-xs text-ink-soft">Built and not-built stretches are picked together: approve the built ones and acknowledge the not-built ones separately.</p>
        )}
        {details.length > 0 && (
          <ul className="mt-2 list-disc pl-5 text-xs text-status-bad">
            {details.map((d) => <li key={d}>{d}</li>)}
          </ul>
        )}
        {done && <div className="mt-2"><Notice tone="ok">{done}</Notice></div>}
      </div>
    </div>
  );
}
