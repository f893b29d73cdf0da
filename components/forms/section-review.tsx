'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Button, Field, Input, Notice, Select } from '@/components/ui/primitives';
import { callApi } from './api-client';

/**
 * Review one section: approve or reject a built stretch; acknowledge a not-built one (settled, with the
 * reason) or reject it. A comment is required for all but approval, and for an approval while quality checks
 * on the stretch are open (the server refuses it otherwise, and keeps the comment in the audit log).
 */
export function SectionReview({ sections, notBuilt = false, openChecks = 0 }: { sections: { id: string; label: string; review: string }[]; notBuilt?: boolean; openChecks?: number }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  async function submit(form: HTMLFormElement, decision: 'approve' | 'reject' | 'acknowledge') {
    const f = new FormData(form);
    const res = await callApi(`/api/sections/${f.get('section')}/review`, 'POST', { decision, comment: String(f.get('comment') ?? '') });
    if (!res.ok) return setError(res.fieldErrors.comment ?? res.message);
    setError(null);
    setDone(decision === 'approve' ? 'Approved.' : decision === 'acknowledge' ? 'Acknowledged as not built.' : 'Rejected.');
    router.refresh();
  }
  return (
    <form
      className="grid gap-3 sm:grid-cols-4"
      onSubmit={(e) => {
        e.preventDefault();
        void submit(e.currentTarget, notBuilt ? 'acknowledge' : 'approve');
      }}
      noValidate
    >
      {sections.length === 1 ? (
        <input type="hidden" name="section" value={sections[0].id} />
      ) : (
        <Field label="Section" htmlFor="review-section">
          <Select id="review-section" name="section">
            {sections.map((s) => <option key={s.id} value={s.id}>{s.label} — {s.review}</option>)}
          </Select>
        </Field>
      )}
      <Field
        label={notBuilt ? 'Reason (why it is not built, or why it must be)' : openChecks > 0 ? `Comment (required: ${openChecks} open quality check${openChecks === 1 ? '' : 's'})` : 'Comment'}
        htmlFor="review-comment"
        error={error ?? undefined}
      >
        <Input id="review-comment" name="comment" aria-invalid={!!error} />
      </Field>
      <div className="flex flex-wrap items-end gap-2 sm:col-span-2">
        <Button type="submit">{notBuilt ? 'Acknowledge not built' : 'Approve'}</Button>
        <Button type="button" variant="danger" onClick={(e) => void submit(e.currentTarget.form!, 'reject')}>Reject</Button>
        {done && <Notice tone="ok">{done}</Notice>}
      </div>
    </form>
  );
}
