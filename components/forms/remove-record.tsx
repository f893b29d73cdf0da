'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Button } from '@/components/ui/primitives';
import { callApi } from './api-client';

/** A small "remove" button for one record (DELETE `url`), asking first; the page reloads on success. */
export function RemoveRecordButton({ url, label, confirmText }: { url: string; label: string; confirmText: string }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  return (
    <span className="inline-flex flex-col">
      <Button
        type="button"
        variant="secondary"
        disabled={busy}
        aria-label={label}
        onClick={async () => {
          if (!window.confirm(confirmText)) return;
          setBusy(true);
          const res = await callApi(url, 'DELETE');
          setBusy(false);
          if (res.ok) router.refresh();
          else setError(res.message);
        }}
      >
        Remove
      </Button>
      {error && <span role="alert" className="text-xs text-status-bad">{error}</span>}
    </span>
  );
}
