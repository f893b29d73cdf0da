import type { Metadata } from 'next';
import { getDb } from '@/db/client';
import { listApiTokens } from '@/db/api-tokens';
import { requirePrincipal } from '@/lib/auth/session';
import { ROLE_LABELS } from '@/lib/auth/roles';
import { Card, PageHeader } from '@/components/ui/primitives';
import { TokenManager } from '@/components/forms/token-manager';
import { UnitChoice } from '@/components/forms/unit-choice';

export const metadata: Metadata = { title: 'Account' };

export default async function AccountPage() {
  const me = await requirePrincipal();
  const tokens = await listApiTokens(getDb(), me.id);
  return (
    <>
      <PageHeader title="Account" subtitle={`${me.name} · ${me.email}`} />
      <div className="space-y-6">
        <Card title="You">
          <p className="text-sm">
            {ROLE_LABELS[me.role]} at {me.organisationName}. Your administrator sets your role.
          </p>
        </Card>
        <Card title="Units">
          <UnitChoice initial={me.unitSystem} />
        </Card>
        <Card title="Personal API tokens">
          <p className="mb-4 text-sm text-ink-soft">
            For scripts and field software: send <code>Authorization: Bearer &lt;token&gt;</code> to any /api route. A token
            acts with your role and organisation; it is shown once and stored only as a hash.
          </p>
          <TokenManager tokens={tokens} />
        </Card>
      </div>
    </>
  );
}
