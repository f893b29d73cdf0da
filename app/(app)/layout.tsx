import Link from 'next/link';
import { requirePrincipal } from '@/lib/auth/session';
import { navigationFor } from '@/lib/auth/navigation';
import { ROLE_LABELS } from '@/lib/auth/roles';
import { BrandMark } from '@/components/ui/brand';
import { NavLinks } from '@/components/nav/nav-links';
import { SignOutButton } from '@/components/nav/sign-out-button';

export const dynamic = 'force-dynamic';

export default async function AppLayout({ children }: { children: React.ReactNode }) {
  const me = await requirePrincipal();
  return (
    <div className="min-h-screen">
      <header className="border-b border-ink/10 bg-paper-raised">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-3">
          <Link href="/projects" className="flex items-center gap-2 text-ink no-underline hover:no-underline">
            <BrandMark />
            <span className="text-lg font-semibold tracking-tight">Trenchbook</span>
          </Link>
          <NavLinks items={navigationFor(me.role)} />
          <div className="ml-auto flex items-center gap-3 text-sm">
            <span className="text-right leading-tight">
              <span className="block font-medium">{me.name}</span>
              <span className="block text-xs text-ink-soft" data-testid="whoami">
                {ROLE_LABELS[me.role]} · {me.organisationName}
              </span>
            </span>
            <SignOutButton />
          </div>
        </div>
      </header>
      <main className="mx-auto max-w-6xl px-4 py-8">{children}</main>
    </div>
  );
}
