'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Button } from '@/components/ui/primitives';
import { callApi } from './api-client';

/** Removes an installed bundle or a joint after a confirmation; the audit log keeps what it was. */
export function DuctRecordDelete({ url, what }: { url: string; what: string }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  return (
    <span className="inline-flex flex-col gap-1">
      <Button
        type="button"
        variant="secondary"
        className="min-h-10"
        disabled={busy}
        onClick={async () => {
          if (!window.confirm(`Remove ${what}? The activity log keeps what it was.`)) return;
          setBusy(true);
          const r = await callApi(url, 'DELETE');
          setBusy(false);
          if (r.ok) router.refresh();
          else setError(r.message);
        }}
      >
        Remove
      </Button>
      {error && <span className="text-xs text-status-bad">{error}</span>}
    </span>
  );
}

/** Derives the planned bundles again from the current plan's ducts attribute. */
export function PlannedBundlesRefresh({ projectId }: { projectId: string }) {
  const router = useRouter();
  const [note, setNote] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  return (
    <span className="inline-flex flex-col gap-1">
      <Button
        type="button"
        variant="secondary"
        disabled={busy}
        onClick={async () => {
          setBusy(true);
          const r = await callApi<{ planned: { created: number; removed: number; kept: number; unreadable: { ref: string; message: string }[] } }>(`/api/projects/${projectId}/duct-bundles/planned`, 'POST');
          setBusy(false);
          if (!r.ok) return setNote(r.message);
          const p = r.data.planned;
          setNote(`${p.created} derived, ${p.removed} removed, ${p.kept} unchanged.${p.unreadable.length ? ` Not understood: ${p.unreadable.map((u) => `${u.ref} (${u.message})`).join('; ')}` : ''}`);
          router.refresh();
        }}
      >
        {busy ? 'Deriving…' : 'Derive planned bundles from the plan'}
      </Button>
      {note && <span className="text-xs text-ink-soft" aria-live="polite">{note}</span>}
    </span>
  );
}
