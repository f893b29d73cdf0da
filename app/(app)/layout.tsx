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
      <header className="border-b border-ink/10 bg-paper-raised print:hidden">
        {/* one row at every width: on a phone the mark stands for the name and the links scroll sideways */}
        <div className="mx-auto flex max-w-6xl items-center gap-x-3 px-4 py-2 sm:gap-x-6 sm:py-3">
          <Link href="/projects" className="flex shrink-0 items-center gap-2 text-ink no-underline hover:no-underline" aria-label="Trenchbook, all projects">
            <BrandMark />
            <span className="hidden text-lg font-semibold tracking-tight sm:inline">Trenchbook</span>
          </Link>
          <NavLinks items={navigationFor(me.role)} />
          <div className="ml-auto flex shrink-0 items-center gap-3 text-sm">
            <span className="hidden text-right leading-tight md:block">
              <span className="block font-medium">{me.name}</span>
              <span className="block text-xs text-ink-soft" data-testid="whoami">
                {ROLE_LABELS[me.role]} · {me.organisationName}
              </span>
            </span>
            <SignOutButton />
          </div>
        </div>
      </header>
      <main className="mx-auto max-w-6xl px-4 py-5 sm:py-8">{children}</main>
    </div>
  );
}
