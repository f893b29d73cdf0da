'use client';

import { useState } from 'react';
import { Button, Field, Input, Notice } from '@/components/ui/primitives';
import { callApi } from './api-client';

export function WelcomeForm({ token }: { token: string }) {
  const [error, setError] = useState<{ message: string; field?: string } | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    const password = String(form.get('password') ?? '');
    if (password !== String(form.get('confirm') ?? '')) {
      setError({ message: 'The two passwords differ.', field: 'confirm' });
      return;
    }
    setBusy(true);
    const res = await callApi<{ email: string }>('/api/welcome', 'POST', { token, password });
    setBusy(false);
    if (res.ok) setDone(res.data.email);
    else setError({ message: res.fieldErrors.password ?? res.message, field: res.fieldErrors.password ? 'password' : undefined });
  }

  if (done)
    return (
      <Notice tone="ok">
        Password set for {done}. <a href="/sign-in">Sign in</a>.
      </Notice>
    );
  return (
    <form onSubmit={onSubmit} className="space-y-4" noValidate>
      {error && !error.field && <Notice tone="bad">{error.message}</Notice>}
      <Field label="New password" htmlFor="password" error={error?.field === 'password' ? error.message : undefined} hint="At least 12 characters.">
        <Input id="password" name="password" type="password" autoComplete="new-password" aria-invalid={error?.field === 'password'} />
      </Field>
      <Field label="Repeat the password" htmlFor="confirm" error={error?.field === 'confirm' ? error.message : undefined}>
        <Input id="confirm" name="confirm" type="password" autoComplete="new-password" aria-invalid={error?.field === 'confirm'} />
      </Field>
      <Button type="submit" disabled={busy} className="w-full">
        Set password
      </Button>
    </form>
  );
}
