import { BrandMark } from '@/components/ui/brand';

export default function AuthLayout({ children }: { children: React.ReactNode }) {
  return (
    <main className="flex min-h-screen items-center justify-center px-4 py-10">
      <div className="w-full max-w-sm">
        <div className="mb-6 flex items-center gap-3">
          <BrandMark className="h-9 w-9" />
          <div>
            <p className="text-xl font-semibold tracking-tight">Trenchbook</p>
            <p className="text-xs text-ink-soft">The as-laid record of your duct network</p>
          </div>
        </div>
        <div className="rounded-lg border border-ink/10 bg-paper-raised p-6 shadow-sm">{children}</div>
      </div>
    </main>
  );
}
