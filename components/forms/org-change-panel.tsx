'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import type { OrgChange } from '@/db/org-changes';
import type { Organisation } from '@/db/organisations';
import { Badge, Button, Field, Input, Notice, Select } from '@/components/ui/primitives';
import { callApi } from './api-client';
import { RegisterOrganisation } from './register-organisation';

type Side = 'owner' | 'contractor';
const SIDE: Record<Side, string> = { owner: 'network owner', contractor: 'contractor' };
const STATUS: Record<OrgChange['status'], { text: string; tone: 'ok' | 'warn' | 'bad' | 'muted' }> = {
  pending: { text: 'waiting for an answer', tone: 'warn' },
  confirmed: { text: 'confirmed', tone: 'ok' },
  declined: { text: 'declined', tone: 'bad' },
  withdrawn: { text: 'withdrawn', tone: 'muted' },
};

/**
 * Who owns and who builds the project, and the way to change either: one organisation proposes, the
 * other confirms. Nothing moves until the other organisation's admin confirms.
 */
export function OrgChangePanel({
  projectId,
  myOrganisationId,
  owner,
  contractor,
  changes,
  organisations,
  timeZone,
}: {
  projectId: string;
  myOrganisationId: string;
  owner: { id: string; name: string };
  contractor: { id: string; name: string };
  changes: OrgChange[];
  organisations: Organisation[];
  timeZone: string;
}) {
  const router = useRouter();
  const [side, setSide] = useState<Side>('owner');
  const [target, setTarget] = useState('');
  const [reason, setReason] = useState('');
  const [note, setNote] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<{ tone: 'ok' | 'bad'; text: string } | null>(null);
  const [busy, setBusy] = useState(false);
  const [known, setKnown] = useState(organisations);
  const fmt = new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'short', timeZone });
  const pending = changes.find((c) => c.status === 'pending');
  const other = myOrganisationId === owner.id ? contractor : owner;
  const current = side === 'owner' ? owner : contractor;
  const choices = known.filter((o) => o.kind === side && o.id !== current.id);

  async function propose(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    const res = await callApi('/api/projects/' + projectId + '/org-changes', 'POST', { side, organisationId: target, reason });
    setBusy(false);
    if (!res.ok) {
      setErrors(res.fieldErrors);
      setMessage({ tone: 'bad', text: res.message });
      return;
    }
    setErrors({});
    setReason('');
    setTarget('');
    setMessage({ tone: 'ok', text: `Proposed. An admin of ${other.name} must confirm it before anything changes.` });
    router.refresh();
  }

  async function answer(decision: 'confirm' | 'decline' | 'withdraw') {
    if (!pending) return;
    setBusy(true);
    const res = await callApi(`/api/projects/${projectId}/org-changes/${pending.id}`, 'PATCH', { decision, note: note.trim() || undefined });
    setBusy(false);
    if (!res.ok) {
      setMessage({ tone: 'bad', text: res.message });
      return;
    }
    setNote('');
    if (decision === 'confirm' && pending.fromOrgId === myOrganisationId) {
      // our organisation handed the project on: it is no longer ours to see
      router.push('/projects');
      return;
    }
    setMessage({ tone: 'ok', text: { confirm: 'Confirmed: the project has moved.', decline: 'Declined: nothing changed.', withdraw: 'Withdrawn: nothing changed.' }[decision] });
    router.refresh();
  }

  return (
    <div className="space-y-5">
      <dl className="grid gap-3 sm:grid-cols-2">
        <div>
          <dt className="text-xs uppercase tracking-wide text-ink-faint">Network owner</dt>
          <dd className="text-sm font-medium">{owner.name}</dd>
        </div>
        <div>
          <dt className="text-xs uppercase tracking-wide text-ink-faint">Contractor</dt>
          <dd className="text-sm font-medium">{contractor.name}</dd>
        </div>
      </dl>
      <p className="text-sm text-ink-soft">
        Changing either needs both organisations: an admin of one proposes the change, an admin of the other confirms it. Until then the project stays
        where it is. An organisation that is replaced no longer sees the project.
      </p>
      {message && (
        <div role="status">
          <Notice tone={message.tone}>{message.text}</Notice>
        </div>
      )}

      {pending ? (
        <section aria-label="Proposed change" className="space-y-3 rounded-md border border-status-warn/60 bg-status-warn/10 p-4">
          <p className="text-sm">
            <strong>{pending.proposedByName ?? 'An admin'}</strong> ({pending.proposedByOrgName}) proposed on {fmt.format(new Date(pending.proposedAt))} to change the{' '}
            {SIDE[pending.side]} from <strong>{pending.fromOrgName}</strong> to <strong>{pending.toOrgName}</strong>.
          </p>
          <p className="text-sm text-ink-soft">Reason: {pending.reason}</p>
          {pending.proposedByOrgId === myOrganisationId ? (
            <>
              <p className="text-sm">Waiting for an admin of {other.name} to confirm or decline.</p>
              <Button type="button" variant="secondary" disabled={busy} onClick={() => answer('withdraw')}>
                Withdraw the proposal
              </Button>
            </>
          ) : (
            <>
              <Field label="Note with your answer (optional)" htmlFor="org-change-note">
                <Input id="org-change-note" value={note} onChange={(e) => setNote(e.target.value)} />
              </Field>
              <div className="flex flex-wrap gap-2">
                <Button type="button" disabled={busy} onClick={() => answer('confirm')}>
                  Confirm: {pending.toOrgName} becomes the {SIDE[pending.side]}
                </Button>
                <Button type="button" variant="danger" disabled={busy} onClick={() => answer('decline')}>
                  Decline
                </Button>
              </div>
            </>
          )}
        </section>
      ) : (
        <form onSubmit={propose} className="grid gap-4 sm:grid-cols-2" aria-label="Propose a change" noValidate>
          <Field label="What changes" htmlFor="org-change-side">
            <Select id="org-change-side" value={side} onChange={(e) => { setSide(e.target.value as Side); setTarget(''); }}>
              <option value="owner">The network owner</option>
              <option value="contractor">The contractor</option>
            </Select>
          </Field>
          <Field label={`New ${SIDE[side]}`} htmlFor="org-change-target" error={errors.organisationId} hint={choices.length ? undefined : `No other ${SIDE[side]} is registered yet.`}>
            <Select id="org-change-target" value={target} onChange={(e) => setTarget(e.target.value)} aria-invalid={!!errors.organisationId}>
              <option value="">Pick the {SIDE[side]}…</option>
              {choices.map((o) => (
                <option key={o.id} value={o.id}>
                  {o.name}
                </option>
              ))}
            </Select>
          </Field>
          <div className="sm:col-start-2">
            <RegisterOrganisation
              key={side}
              kind={side}
              onRegistered={(org) => {
                setKnown((k) => [...k, { ...org, kind: side }].sort((a, b) => a.name.localeCompare(b.name)));
                setTarget(org.id);
              }}
            />
          </div>
          <div className="sm:col-span-2">
            <Field label="Reason" htmlFor="org-change-reason" error={errors.reason} hint={`${other.name} reads this before confirming.`}>
              <Input id="org-change-reason" value={reason} onChange={(e) => setReason(e.target.value)} aria-invalid={!!errors.reason} />
            </Field>
          </div>
          <div className="sm:col-span-2">
            <Button type="submit" disabled={busy || !target}>
              Propose the change
            </Button>
          </div>
        </form>
      )}

      {changes.some((c) => c.status !== 'pending') && (
        <details>
          <summary className="cursor-pointer text-sm font-medium">Earlier proposals</summary>
          <ul className="mt-2 space-y-2 text-sm">
            {changes
              .filter((c) => c.status !== 'pending')
              .map((c) => (
                <li key={c.id} className="flex flex-wrap items-center gap-2">
                  <Badge tone={STATUS[c.status].tone}>{STATUS[c.status].text}</Badge>
                  <span>
                    {SIDE[c.side]}: {c.fromOrgName} → {c.toOrgName}, proposed by {c.proposedByOrgName} on {fmt.format(new Date(c.proposedAt))}
                    {c.answeredAt && `; answered by ${c.answeredByName ?? 'an admin'} on ${fmt.format(new Date(c.answeredAt))}`}
                    {c.answerNote && ` (“${c.answerNote}”)`}
                  </span>
                </li>
              ))}
          </ul>
        </details>
      )}
    </div>
  );
}
