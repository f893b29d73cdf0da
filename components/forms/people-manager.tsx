'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import type { User } from '@/db/users';
import { ROLE_LABELS, ROLES, type Role } from '@/lib/auth/roles';
import { Button, Card, Field, Input, Notice, Select } from '@/components/ui/primitives';
import { DataTable } from '@/components/ui/data-table';
import { callApi } from './api-client';

interface Onboarding {
  temporaryPassword?: string;
  linkPath?: string;
  linkExpiresAt?: string;
}

function Credentials({ who, o }: { who: string; o: Onboarding }) {
  const link = o.linkPath ? `${window.location.origin}${o.linkPath}` : null;
  return (
    <Notice tone="ok">
      <p className="font-medium">Shown once: pass it to {who} in person or by a channel you trust.</p>
      {o.temporaryPassword && (
        <p>
          Temporary password: <code data-testid="temporary-password" className="rounded bg-white px-1">{o.temporaryPassword}</code>
        </p>
      )}
      {link && (
        <p className="break-all">
          One-time link (valid until {new Date(o.linkExpiresAt!).toLocaleString('en-GB')}):{' '}
          <code data-testid="one-time-link" className="rounded bg-white px-1">{link}</code>
        </p>
      )}
    </Notice>
  );
}

export function PeopleManager({ users, selfId }: { users: User[]; selfId: string }) {
  const router = useRouter();
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [issued, setIssued] = useState<{ who: string; o: Onboarding } | null>(null);
  const [busy, setBusy] = useState(false);

  async function create(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const f = new FormData(form);
    setBusy(true);
    const res = await callApi<{ user: User; onboarding: Onboarding }>('/api/users', 'POST', {
      email: String(f.get('email') ?? '').trim(),
      name: String(f.get('name') ?? '').trim(),
      role: f.get('role'),
      onboarding: f.get('onboarding'),
    });
    setBusy(false);
    if (!res.ok) {
      setErrors(res.fieldErrors);
      setMessage(Object.keys(res.fieldErrors).length ? 'Some fields need attention.' : res.message);
      return;
    }
    setErrors({});
    setMessage(null);
    setIssued({ who: res.data.user.name, o: res.data.onboarding });
    form.reset();
    router.refresh();
  }

  async function change(u: User, patch: Record<string, unknown>) {
    const res = await callApi<{ user: User; onboarding?: Onboarding }>(`/api/users/${u.id}`, 'PATCH', patch);
    if (!res.ok) return setMessage(res.message);
    setMessage(null);
    if (res.data.onboarding) setIssued({ who: u.name, o: res.data.onboarding });
    router.refresh();
  }

  return (
    <div className="space-y-6">
      {issued && <Credentials who={issued.who} o={issued.o} />}
      {message && <Notice tone="bad">{message}</Notice>}
      <Card title="Add a person">
        <form onSubmit={create} className="grid gap-4 md:grid-cols-5" noValidate>
          <Field label="Name" htmlFor="new-name" error={errors.name}>
            <Input id="new-name" name="name" aria-invalid={!!errors.name} />
          </Field>
          <Field label="E-mail" htmlFor="new-email" error={errors.email}>
            <Input id="new-email" name="email" type="email" aria-invalid={!!errors.email} />
          </Field>
          <Field label="Role" htmlFor="new-role" error={errors.role}>
            <Select id="new-role" name="role" defaultValue="surveyor">
              {ROLES.map((r) => (
                <option key={r} value={r}>
                  {ROLE_LABELS[r]}
                </option>
              ))}
            </Select>
          </Field>
          <Field label="First sign-in" htmlFor="new-onboarding">
            <Select id="new-onboarding" name="onboarding" defaultValue="invitation">
              <option value="invitation">One-time link</option>
              <option value="password">Temporary password</option>
            </Select>
          </Field>
          <div className="flex items-end">
            <Button type="submit" disabled={busy}>
              Add person
            </Button>
          </div>
        </form>
      </Card>
      <DataTable
        label="People"
        columns={[
          { key: 'name', label: 'Name' },
          { key: 'email', label: 'E-mail' },
          { key: 'role', label: 'Role', priority: 1 },
          { key: 'state', label: 'State', priority: 1 },
          { key: 'actions', label: 'Actions' },
        ]}
        rows={users.map((u) => ({
          id: u.id,
          cells: {
            name: u.name,
            email: u.email,
            role: {
              text: ROLE_LABELS[u.role],
              node: (
                <>
                  <label className="sr-only" htmlFor={`role-${u.id}`}>
                    Role of {u.name}
                  </label>
                  <Select id={`role-${u.id}`} value={u.role} disabled={u.id === selfId} onChange={(e) => change(u, { role: e.target.value as Role })} className="w-40 py-1">
                    {ROLES.map((r) => (
                      <option key={r} value={r}>
                        {ROLE_LABELS[r]}
                      </option>
                    ))}
                  </Select>
                </>
              ),
            },
            state: u.active ? (u.hasPassword ? { text: 'Active', tone: 'ok' } : { text: 'Invited', tone: 'warn' }) : { text: 'Deactivated', tone: 'muted' },
            actions: {
              text: '',
              node: (
                <span className="flex flex-wrap gap-2">
                  {u.id !== selfId && (
                    <Button variant={u.active ? 'danger' : 'secondary'} onClick={() => change(u, { active: !u.active })} aria-label={`${u.active ? 'Deactivate' : 'Reactivate'} ${u.name}`}>
                      {u.active ? 'Deactivate' : 'Reactivate'}
                    </Button>
                  )}
                  <Button variant="secondary" onClick={() => change(u, { reset: 'link' })} aria-label={`Reset password of ${u.name}`}>
                    Reset password
                  </Button>
                </span>
              ),
            },
          },
        }))}
      />
    </div>
  );
}
