'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Button, Card, Field, Input, Notice } from '@/components/ui/primitives';
import { callApi } from './api-client';

/** The organisation's contact, which maintenance crews see in the duct lookup beside the network it owns. */
export function OrganisationContactForm({ contact, ownsNetwork }: { contact: string; ownsNetwork: boolean }) {
  const router = useRouter();
  const [value, setValue] = useState(contact);
  const [error, setError] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  const [busy, setBusy] = useState(false);

  async function save(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setSaved(false);
    const res = await callApi<{ organisation: { contact: string } }>('/api/me/organisation', 'PATCH', { contact: value });
    setBusy(false);
    if (!res.ok) return setError(res.fieldErrors.contact ?? res.message);
    setError(null);
    setSaved(true);
    setValue(res.data.organisation.contact);
    router.refresh();
  }

  return (
    <Card title="Contact for the duct lookup">
      <form onSubmit={save} className="space-y-3" aria-label="Contact for the duct lookup">
        <p className="text-sm text-ink-soft">
          {ownsNetwork
            ? 'Crews who look up the ducts at an address see this beside every stretch of your network: who to call before digging near it.'
            : 'Shown in the duct lookup beside the networks your organisation owns (network owners). As a contractor you may leave it empty.'}
        </p>
        <Field label="Contact" htmlFor="org-contact" error={error ?? undefined}>
          <Input id="org-contact" value={value} maxLength={500} onChange={(e) => setValue(e.target.value)} placeholder="Network desk, telephone, e-mail" />
        </Field>
        <Button type="submit" disabled={busy}>Save the contact</Button>
        {saved && <Notice tone="ok">Saved: {value ? `the lookup now shows “${value}”.` : 'the lookup shows no contact.'}</Notice>}
      </form>
    </Card>
  );
}
