'use client';

import Link from 'next/link';
import { usePathname } from 'next/navigation';
import type { NavItem } from '@/lib/auth/navigation';

export function NavLinks({ items, label = 'Main' }: { items: NavItem[]; label?: string }) {
  const path = usePathname();
  return (
    <nav aria-label={label} className="min-w-0 overflow-x-auto [scrollbar-width:none]">
      <ul className="flex gap-1 whitespace-nowrap text-sm">
        {items.map((i) => {
          // '/projects' stays lit inside a project; project tabs light only their own subtree
          const active = path === i.href || path.startsWith(`${i.href}/`);
          return (
            <li key={i.href}>
              <Link
                href={i.href}
                aria-current={active ? 'page' : undefined}
                className={`rounded-md px-3 py-1.5 no-underline hover:no-underline ${active ? 'bg-brand-light font-semibold text-brand-dark' : 'text-ink-soft hover:bg-paper-sunk'}`}
              >
                {i.label}
              </Link>
            </li>
          );
        })}
      </ul>
    </nav>
  );
}
