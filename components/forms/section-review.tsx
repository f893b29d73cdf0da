'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Button, Field, Input, Notice, Select } from '@/components/ui/primitives';
import { callApi } from './api-client';

/** Approve or reject a section, with a comment (required to reject). */
export function SectionReview({ sections }: { sections: { id: string; label: string; review: string }[] }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  async function submit(e: React.FormEvent<HTMLFormElement>, decision: 'approve' | 'reject') {
    e.preventDefault();
    const f = new FormData(e.currentTarget.form ?? e.currentTarget);
    const res = await callApi(`/api/sections/${f.get('section')}/review`, 'POST', { decision, comment: String(f.get('comment') ?? '') });
    if (!res.ok) return setError(res.fieldErrors.comment ?? res.message);
    setError(null);
    setDone(decision === 'approve' ? 'Approved.' : 'Rejected.');
    router.refresh();
  }
  return (
    <form className="grid gap-3 sm:grid-cols-4" onSubmit={(e) => submit(e, 'approve')} noValidate>
      {sections.length === 1 ? (
        <input type="hidden" name="section" value={sections[0].id} />
      ) : (
        <Field label="Section" htmlFor="review-section">
          <Select id="review-section" name="section">
            {sections.map((s) => <option key={s.id} value={s.id}>{s.label} — {s.review}</option>)}
          </Select>
        </Field>
      )}
      <Field label="Comment" htmlFor="review-comment" error={error ?? undefined}>
        <Input id="review-comment" name="comment" aria-invalid={!!error} />
      </Field>
      <div className="flex items-end gap-2 sm:col-span-2">
        <Button type="submit">Approve</Button>
        <Button type="button" variant="danger" onClick={(e) => submit(e as unknown as React.FormEvent<HTMLFormElement>, 'reject')}>Reject</Button>
        {done && <Notice tone="ok">{done}</Notice>}
      </div>
    </form>
  );
}
