'use client';

import { useRouter } from 'next/navigation';
import { useId, useState } from 'react';
import { useFieldArray, type Path } from 'react-hook-form';
import type { z } from 'zod';
import { Button, Field, Input } from '@/components/ui/primitives';
import { backfillMaterialSchema, colourSequenceSchema, ductSizeSchema, utilityKindSchema } from '@/lib/records/catalogue-schemas';
import { callApi } from './api-client';
import { CheckboxField, NumberField, RecordForm, SelectField, TextField, useRecordForm, type RecordFormState } from './record-form';

/**
 * The catalogue page's controls for the contractor's admins and engineers: add a duct size, a colour
 * sequence, a utility kind or a backfill material (forms with the API's schemas), and retire or bring back
 * a row (nothing is deleted: records keep pointing at what they used).
 */

/** One PATCH on a catalogue row, e.g. `{ retired: true }`, then the page again. */
export function CatalogueToggle({ url, body, label }: { url: string; body: Record<string, unknown>; label: string }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  return (
    <span className="inline-flex flex-col gap-1">
      <Button
        type="button"
        variant="secondary"
        className="min-h-10"
        disabled={busy}
        onClick={async () => {
          setBusy(true);
          const r = await callApi(url, 'PATCH', body);
          setBusy(false);
          if (r.ok) router.refresh();
          else setError(r.message);
        }}
      >
        {label}
      </Button>
      {error && <span className="text-xs text-status-bad">{error}</span>}
    </span>
  );
}

export function DuctSizeAdd({ projectId }: { projectId: string }) {
  const rf = useRecordForm({ schema: ductSizeSchema, draftKey: `catalogue-size:${projectId}`, defaults: { common: false } as unknown as z.input<typeof ductSizeSchema>, url: `/api/projects/${projectId}/catalogues/duct-sizes`, savedText: 'Size added.' });
  return (
    <RecordForm rf={rf} title="Add a duct size" submitLabel="Add size">
      <NumberField rf={rf} name="outerMm" label="Outer diameter (mm)" />
      <NumberField rf={rf} name="innerMm" label="Inner diameter (mm)" />
      <CheckboxField rf={rf} name="common" label="A common size (offered first)" />
    </RecordForm>
  );
}

type SeqValues = z.input<typeof colourSequenceSchema>;

function ColourRow({ rf, index, onRemove }: { rf: RecordFormState<SeqValues>; index: number; onRemove?: () => void }) {
  const id = useId();
  const err = (k: 'name' | 'hex') => (rf.form.formState.errors.colours as { [i: number]: { name?: { message?: string }; hex?: { message?: string } } } | undefined)?.[index]?.[k]?.message;
  return (
    <div className="flex items-end gap-2" role="group" aria-label={`Colour ${index + 1}`}>
      <div className="flex-1">
        <Field label={`Colour ${index + 1}`} htmlFor={`${id}-name`} error={err('name')}>
          <Input id={`${id}-name`} {...rf.form.register(`colours.${index}.name` as Path<SeqValues>)} className="min-h-12 text-base" />
        </Field>
      </div>
      <Field label="Shown as" htmlFor={`${id}-hex`} error={err('hex')}>
        <input id={`${id}-hex`} type="color" {...rf.form.register(`colours.${index}.hex` as Path<SeqValues>)} className="h-12 w-16 rounded-md border border-ink/20" />
      </Field>
      {onRemove && (
        <Button type="button" variant="secondary" className="min-h-12" onClick={onRemove} aria-label={`Remove colour ${index + 1}`}>
          ✕
        </Button>
      )}
    </div>
  );
}

export function ColourSequenceAdd({ projectId }: { projectId: string }) {
  const defaults: SeqValues = { name: '', standard: '', repeatMarking: 'stripe', colours: [{ name: '', hex: '#1f5fbf' }] };
  const rf = useRecordForm({ schema: colourSequenceSchema, draftKey: `catalogue-sequence:${projectId}`, defaults, url: `/api/projects/${projectId}/catalogues/colour-sequences`, savedText: 'Sequence added: choose it in the project settings to use it.' });
  const { fields, append, remove } = useFieldArray({ control: rf.form.control, name: 'colours' });
  return (
    <RecordForm rf={rf} title="Add a colour sequence" submitLabel="Add sequence">
      <TextField rf={rf} name="name" label="Name" />
      <TextField rf={rf} name="standard" label="Standard it follows (optional)" />
      <SelectField rf={rf} name="repeatMarking" label="Positions after the last colour" options={[{ value: 'stripe', label: 'The same colours with a stripe' }, { value: 'tracer', label: 'The same colours with a tracer' }]} />
      {fields.map((f, i) => (
        <ColourRow key={f.id} rf={rf} index={i} onRemove={fields.length > 1 ? () => remove(i) : undefined} />
      ))}
      {fields.length < 24 && (
        <Button type="button" variant="secondary" className="min-h-12 text-base" onClick={() => append({ name: '', hex: '#808080' })}>
          Add colour
        </Button>
      )}
    </RecordForm>
  );
}

export function UtilityKindAdd({ projectId }: { projectId: string }) {
  const rf = useRecordForm({ schema: utilityKindSchema, draftKey: `catalogue-utility:${projectId}`, defaults: { key: '', label: '' }, url: `/api/projects/${projectId}/catalogues/utility-kinds`, savedText: 'Kind added.' });
  return (
    <RecordForm rf={rf} title="Add a utility kind" submitLabel="Add kind">
      <TextField rf={rf} name="label" label="Label" />
      <TextField rf={rf} name="key" label="Key (lower-case, e.g. street_lighting)" />
    </RecordForm>
  );
}

export function BackfillMaterialAdd({ projectId }: { projectId: string }) {
  const rf = useRecordForm({ schema: backfillMaterialSchema, draftKey: `catalogue-backfill:${projectId}`, defaults: { label: '' }, url: `/api/projects/${projectId}/catalogues/backfill-materials`, savedText: 'Material added.' });
  return (
    <RecordForm rf={rf} title="Add a backfill material" submitLabel="Add material">
      <TextField rf={rf} name="label" label="Material (e.g. Crushed stone 4–8 mm)" />
    </RecordForm>
  );
}
