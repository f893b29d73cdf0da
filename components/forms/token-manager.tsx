'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import type { ApiToken } from '@/db/api-tokens';
import { Badge, Button, Field, Input, Notice } from '@/components/ui/primitives';
import { callApi } from './api-client';

export function TokenManager({ tokens }: { tokens: ApiToken[] }) {
  const router = useRouter();
  const [secret, setSecret] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);

  async function create(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const name = String(new FormData(form).get('name') ?? '').trim();
    const res = await callApi<{ secret: string }>('/api/tokens', 'POST', { name });
    if (!res.ok) return setError(res.fieldErrors.name ?? res.message);
    setError(null);
    setSecret(res.data.secret);
    form.reset();
    router.refresh();
  }

  async function revoke(id: string) {
    const res = await callApi(`/api/tokens/${id}`, 'DELETE');
    if (!res.ok) return setError(res.message);
    router.refresh();
  }

  return (
    <div className="space-y-4">
      {secret && (
        <Notice tone="ok">
          <p className="font-medium">Copy it now: it will not be shown again.</p>
          <code data-testid="new-token" className="break-all rounded bg-white px-1">{secret}</code>
        </Notice>
      )}
      <form onSubmit={create} className="flex flex-wrap items-end gap-3" noValidate>
        <Field label="Token name" htmlFor="token-name" error={error ?? undefined}>
          <Input id="token-name" name="name" placeholder="e.g. rover upload script" aria-invalid={!!error} />
        </Field>
        <Button type="submit">Create token</Button>
      </form>
      <ul className="divide-y divide-ink/10 rounded-md border border-ink/10" aria-label="Your tokens">
        {tokens.length === 0 && <li className="px-3 py-3 text-sm text-ink-faint">No tokens yet.</li>}
        {tokens.map((t) => (
          <li key={t.id} className="flex flex-wrap items-center gap-3 px-3 py-2 text-sm">
            <span className="font-medium">{t.name}</span>
            <code className="text-ink-soft">{t.prefix}…</code>
            <span className="text-ink-faint">created {new Date(t.createdAt).toLocaleDateString('en-GB')}</span>
            {t.lastUsedAt && <span className="text-ink-faint">last used {new Date(t.lastUsedAt).toLocaleString('en-GB')}</span>}
            <span className="ml-auto">
              {t.revokedAt ? (
                <Badge>Revoked</Badge>
              ) : (
                <Button variant="danger" onClick={() => revoke(t.id)} aria-label={`Revoke ${t.name}`}>
                  Revoke
                </Button>
              )}
            </span>
          </li>
        ))}
      </ul>
    </div>
  );
}
