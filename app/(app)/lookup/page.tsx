import type { Metadata } from 'next';
import { requirePrincipal } from '@/lib/auth/session';
import { PageHeader } from '@/components/ui/primitives';
import { LookupPanel } from '@/components/forms/lookup-panel';

export const metadata: Metadata = { title: 'Duct lookup' };

// Every role: what Trenchbook knows about the ducts at a spot, across the projects the organisation sees.
export default async function LookupPage() {
  const me = await requirePrincipal();
  return (
    <>
      <div className="print:hidden">
        <PageHeader title="Duct lookup" subtitle={`The ducts recorded near an address or a spot, in the networks ${me.organisationName} owns or builds.`} />
      </div>
      <LookupPanel />
    </>
  );
}
