import type { Metadata } from 'next';
import { WelcomeForm } from '@/components/forms/welcome-form';

export const metadata: Metadata = { title: 'Set your password' };

export default async function WelcomePage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  return (
    <>
      <h1 className="mb-2 text-lg font-semibold">Set your password</h1>
      <p className="mb-4 text-sm text-ink-soft">This link works once. Choose a password of at least 12 characters.</p>
      <WelcomeForm token={token} />
    </>
  );
}
