import Link from 'next/link';
import type { ReactNode } from 'react';

/** The body of every "not found" page: what happened, in plain words, and where to go instead. */
export function NotFoundPanel({ title, children, links }: { title: string; children: ReactNode; links: { href: string; label: string }[] }) {
  return (
    <section className="mx-auto max-w-xl rounded-lg border border-ink/10 bg-paper-raised p-6 text-center shadow-sm sm:p-10" aria-labelledby="not-found-title">
      <svg viewBox="0 0 64 40" className="mx-auto mb-4 h-12 w-20" aria-hidden="true">
        {/* a trench that stops short: the road surface, the slot, and a duct that ends in the open */}
        <rect x="0" y="8" width="64" height="6" rx="1" fill="#ebe7de" />
        <path d="M6 14h34v18H6z" fill="#d6e8e6" />
        <path d="M10 23h26" stroke="#1d5c63" strokeWidth="4" strokeLinecap="round" />
        <circle cx="52" cy="24" r="6" fill="none" stroke="#7b8a92" strokeWidth="2" strokeDasharray="3 3" />
      </svg>
      <p className="text-xs font-semibold uppercase tracking-wide text-ink-faint">Not found</p>
      <h1 id="not-found-title" className="mt-1 text-2xl font-semibold tracking-tight">
        {title}
      </h1>
      <div className="mt-3 text-sm text-ink-soft">{children}</div>
      <ul className="mt-6 flex flex-wrap justify-center gap-3">
        {links.map((l, i) => (
          <li key={l.href}>
            <Link
              href={l.href}
              className={
                i === 0
                  ? 'inline-flex rounded-md bg-brand px-3.5 py-2 text-sm font-medium text-white no-underline hover:bg-brand-dark hover:no-underline'
                  : 'inline-flex rounded-md border border-ink/15 px-3.5 py-2 text-sm font-medium text-ink no-underline hover:bg-paper-sunk hover:no-underline'
              }
            >
              {l.label}
            </Link>
          </li>
        ))}
      </ul>
    </section>
  );
}
