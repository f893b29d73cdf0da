'use client';

import { useState } from 'react';
import { Button, Field, Input } from '@/components/ui/primitives';
import { callApi } from './api-client';

/**
 * Registers a new network owner or contractor as a step of its own: a link opens it, the name is typed
 * and checked, and a button names exactly what will be registered. Projects then pick it from the list.
 */
export function RegisterOrganisation({ kind, onRegistered }: { kind: 'owner' | 'contractor'; onRegistered: (org: { id: string; name: string }) => void }) {
  const [open, setOpen] = useState(false);
  const [name, setName] = useState('');
  const [problem, setProblem] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const side = kind === 'owner' ? 'network owner' : 'contractor';
  const id = `new-organisation-${kind}`;

  async function register() {
    setProblem(null);
    setBusy(true);
    const res = await callApi<{ organisation: { id: string; name: string } }>('/api/organisations', 'POST', { name: name.trim(), kind });
    setBusy(false);
    if (!res.ok) {
      setProblem(res.fieldErrors.name ?? res.message);
      return;
    }
    onRegistered(res.data.organisation);
    setOpen(false);
    setName('');
  }

  if (!open) {
    return (
      <button type="button" className="text-xs font-medium text-brand-dark underline" onClick={() => setOpen(true)}>
        Not in the list? Register a new {side}
      </button>
    );
  }
  return (
    <div className="space-y-2 rounded-md border border-ink/15 bg-paper p-3" role="group" aria-label={`Register a new ${side}`}>
      <Field label={`Full name of the new ${side}`} htmlFor={id} error={problem ?? undefined} hint="Check the spelling: the name is shown to everyone who works on its projects.">
        <Input
          id={id}
          value={name}
          onChange={(e) => setName(e.target.value)}
          onKeyDown={(e) => {
            // inside another form, Enter must not submit that form
            if (e.key === 'Enter') e.preventDefault();
          }}
        />
      </Field>
      <div className="flex flex-wrap gap-2">
        <Button type="button" variant="secondary" disabled={busy || name.trim().length < 2} onClick={register}>
          Register {name.trim() ? `“${name.trim()}”` : 'it'}
        </Button>
        <Button type="button" variant="secondary" onClick={() => setOpen(false)}>
          Cancel
        </Button>
      </div>
    </div>
  );
}
