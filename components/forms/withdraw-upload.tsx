'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Button, Field, Input } from '@/components/ui/primitives';
import { callApi } from './api-client';

export function WithdrawUpload({ projectId, uploadId }: { projectId: string; uploadId: string }) {
  const router = useRouter();
  const [open, setOpen] = useState(false);
  const [error, setError] = useState<string | null>(null);
  if (!open) return <Button variant="danger" onClick={() => setOpen(true)}>Withdraw</Button>;
  return (
    <form
      className="flex flex-wrap items-end gap-2"
      onSubmit={async (e) => {
        e.preventDefault();
        const reason = String(new FormData(e.currentTarget).get('reason') ?? '');
        const res = await callApi(`/api/projects/${projectId}/uploads/${uploadId}/withdraw`, 'POST', { reason });
        if (!res.ok) return setError(res.fieldErrors.reason ?? res.message);
        router.refresh();
      }}
    >
      <Field label="Why is it withdrawn?" htmlFor="withdraw-reason" error={error ?? undefined}>
        <Input id="withdraw-reason" name="reason" aria-invalid={!!error} />
      </Field>
      <Button type="submit" variant="danger">Withdraw upload</Button>
    </form>
  );
}
