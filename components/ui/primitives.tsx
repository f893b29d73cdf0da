import type { ButtonHTMLAttributes, InputHTMLAttributes, ReactNode, SelectHTMLAttributes } from 'react';

const cx = (...c: (string | false | null | undefined)[]) => c.filter(Boolean).join(' ');

export function Button({
  variant = 'primary',
  className,
  ...props
}: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: 'primary' | 'secondary' | 'danger' }) {
  return (
    <button
      {...props}
      className={cx(
        'inline-flex items-center justify-center gap-2 rounded-md px-3.5 py-2 text-sm font-medium transition disabled:cursor-not-allowed disabled:opacity-60',
        variant === 'primary' && 'bg-brand text-white hover:bg-brand-dark',
        variant === 'secondary' && 'border border-ink/15 bg-paper-raised text-ink hover:bg-paper-sunk',
        variant === 'danger' && 'border border-status-bad/40 bg-paper-raised text-status-bad hover:bg-status-bad/10',
        className,
      )}
    />
  );
}

export function Card({ title, children, actions }: { title?: ReactNode; children: ReactNode; actions?: ReactNode }) {
  return (
    <section className="rounded-lg border border-ink/10 bg-paper-raised p-5 shadow-sm">
      {(title || actions) && (
        <div className="mb-4 flex items-center justify-between gap-4">
          {title && <h2 className="text-base font-semibold">{title}</h2>}
          {actions}
        </div>
      )}
      {children}
    </section>
  );
}

export function PageHeader({ title, subtitle, actions }: { title: string; subtitle?: ReactNode; actions?: ReactNode }) {
  return (
    <div className="mb-6 flex flex-wrap items-end justify-between gap-4">
      <div>
        <h1 className="text-2xl font-semibold tracking-tight">{title}</h1>
        {subtitle && <p className="mt-1 text-sm text-ink-soft">{subtitle}</p>}
      </div>
      {actions && <div className="flex gap-2">{actions}</div>}
    </div>
  );
}

export function Field({
  label,
  htmlFor,
  error,
  hint,
  children,
}: {
  label: string;
  htmlFor: string;
  error?: string;
  hint?: string;
  children: ReactNode;
}) {
  return (
    <div className="space-y-1">
      <label htmlFor={htmlFor} className="block text-sm font-medium">
        {label}
      </label>
      {children}
      {hint && !error && <p className="text-xs text-ink-faint">{hint}</p>}
      {error && (
        <p id={`${htmlFor}-error`} className="text-xs font-medium text-status-bad">
          {error}
        </p>
      )}
    </div>
  );
}

const inputClass =
  'block w-full rounded-md border border-ink/20 bg-white px-3 py-2 text-sm shadow-inner placeholder:text-ink-faint aria-[invalid=true]:border-status-bad';

export function Input(props: InputHTMLAttributes<HTMLInputElement>) {
  return <input {...props} className={cx(inputClass, props.className)} />;
}

export function Select(props: SelectHTMLAttributes<HTMLSelectElement>) {
  return <select {...props} className={cx(inputClass, props.className)} />;
}

/** A small label; with `swatch` it wears that colour (a status's map colour), so badge, legend and map agree. */
export function Badge({ tone = 'muted', swatch, children }: { tone?: 'ok' | 'warn' | 'bad' | 'info' | 'muted'; swatch?: string; children: ReactNode }) {
  const tones = {
    ok: 'bg-status-ok/15 text-[#00664a]',
    warn: 'bg-status-warn/20 text-[#7a5400]',
    bad: 'bg-status-bad/15 text-[#8f3f00]',
    info: 'bg-status-info/15 text-[#004f7a]',
    muted: 'bg-ink/10 text-ink-soft',
  } as const;
  if (swatch) {
    return (
      <span className="inline-flex items-center gap-1.5 whitespace-nowrap rounded-full border px-2 py-0.5 text-xs font-medium text-ink" style={{ borderColor: swatch, backgroundColor: `${swatch}24` }}>
        <span aria-hidden="true" data-swatch={swatch} className="inline-block h-2 w-2 rounded-full" style={{ backgroundColor: swatch }} />
        {children}
      </span>
    );
  }
  return <span className={cx('inline-flex rounded-full px-2 py-0.5 text-xs font-medium', tones[tone])}>{children}</span>;
}

export function Notice({ tone = 'info', children }: { tone?: 'info' | 'bad' | 'ok' | 'warn'; children: ReactNode }) {
  const tones = {
    info: 'border-status-info/40 bg-status-info/10',
    bad: 'border-status-bad/50 bg-status-bad/10',
    ok: 'border-status-ok/50 bg-status-ok/10',
    warn: 'border-status-warn/60 bg-status-warn/10',
  } as const;
  return <div className={cx('rounded-md border px-3 py-2 text-sm', tones[tone])}>{children}</div>;
}
