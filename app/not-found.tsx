import type { Metadata } from 'next';
import { BrandMark } from '@/components/ui/brand';
import { NotFoundPanel } from '@/components/ui/not-found-panel';

export const metadata: Metadata = { title: 'Not found' };

/** Outside the signed-in app (no header to show): the same panel on the plain page. */
export default function RootNotFound() {
  return (
    <main className="px-4 py-12">
      <div className="mb-8 flex items-center justify-center gap-2">
        <BrandMark />
        <span className="text-lg font-semibold tracking-tight">Trenchbook</span>
      </div>
      <NotFoundPanel title="This page could not be found" links={[{ href: '/projects', label: 'Your projects' }, { href: '/sign-in', label: 'Sign in' }]}>
        <p>The address may be mistyped, or the page has moved.</p>
      </NotFoundPanel>
    </main>
  );
}
