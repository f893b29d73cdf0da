'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Field, Notice, Select } from '@/components/ui/primitives';
import { callApi } from './api-client';

/** The person's own units, saved at once (PATCH /api/me). */
export function UnitChoice({ initial }: { initial: 'metric' | 'imperial' | null }) {
  const router = useRouter();
  const [value, setValue] = useState(initial ?? '');
  const [note, setNote] = useState<{ tone: 'ok' | 'bad'; text: string } | null>(null);
  return (
    <div className="max-w-sm space-y-2">
      <Field label="Units I see" htmlFor="unit-choice" hint="Depths in m or in, lengths in m or ft, temperatures in °C or °F. Stored metric either way.">
        <Select
          id="unit-choice"
          value={value}
          className="min-h-12 text-base"
          onChange={async (e) => {
            const v = e.target.value as '' | 'metric' | 'imperial';
            setValue(v);
            const res = await callApi('/api/me', 'PATCH', { unitSystem: v === '' ? null : v });
            setNote(res.ok ? { tone: 'ok', text: 'Saved.' } : { tone: 'bad', text: res.message });
            if (res.ok) router.refresh();
          }}
        >
          <option value="">As each project is set</option>
          <option value="metric">Metric (mm, m, °C)</option>
          <option value="imperial">Imperial (in, ft, °F)</option>
        </Select>
      </Field>
      {note && <Notice tone={note.tone}>{note.text}</Notice>}
    </div>
  );
}
