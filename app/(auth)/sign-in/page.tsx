import type { Metadata } from 'next';
import { SignInForm } from '@/components/forms/sign-in-form';

export const metadata: Metadata = { title: 'Sign in' };

export default async function SignInPage({ searchParams }: { searchParams: Promise<{ callbackUrl?: string }> }) {
  const { callbackUrl } = await searchParams;
  // only same-site paths are followed after sign-in
  const next = callbackUrl && callbackUrl.startsWith('/') && !callbackUrl.startsWith('//') ? callbackUrl : '/projects';
  return (
    <>
      <h1 className="mb-4 text-lg font-semibold">Sign in</h1>
      <SignInForm callbackUrl={next} />
    </>
  );
}
