'use client';

import { signIn } from 'next-auth/react';
import { useState } from 'react';
import { Button, Field, Input, Notice } from '@/components/ui/primitives';

const MESSAGES: Record<string, string> = {
  CredentialsSignin: 'That e-mail and password do not match an active account.',
  TooManyAttempts: 'Too many failed sign-ins. Wait a few minutes, then try again.',
};

export function SignInForm({ callbackUrl }: { callbackUrl: string }) {
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    setBusy(true);
    setError(null);
    const res = await signIn('credentials', {
      email: String(form.get('email') ?? ''),
      password: String(form.get('password') ?? ''),
      redirect: false,
    });
    setBusy(false);
    if (res?.ok && !res.error) {
      window.location.assign(callbackUrl);
      return;
    }
    setError(MESSAGES[res?.error ?? ''] ?? 'Sign-in failed. Try again.');
  }

  return (
    <form onSubmit={onSubmit} className="space-y-4" noValidate>
      {error && (
        <div role="status" aria-live="polite">
          <Notice tone="bad">{error}</Notice>
        </div>
      )}
      <Field label="E-mail" htmlFor="email">
        <Input id="email" name="email" type="email" autoComplete="username" required />
      </Field>
      <Field label="Password" htmlFor="password">
        <Input id="password" name="password" type="password" autoComplete="current-password" required />
      </Field>
      <Button type="submit" disabled={busy} className="w-full">
        {busy ? 'Signing in…' : 'Sign in'}
      </Button>
    </form>
  );
}
