'use client';

import { productionCorrectionSchema, PRODUCTION_QUANTITIES, QUANTITY_LABELS } from '@/lib/records/production';
import { NumberField, RecordForm, SelectField, TextField, useRecordForm } from './record-form';

/**
 * Corrects one figure of a day and crew by hand, with the reason (required). Metres are typed in metres:
 * the derived figures beside them are metres too. The derived figure stays visible beside the correction.
 */
export function ProductionCorrectionForm({ projectId, crews }: { projectId: string; crews: string[] }) {
  const rf = useRecordForm({
    schema: productionCorrectionSchema,
    draftKey: `production-correction:${projectId}`,
    defaults: { day: '', crew: crews[0] ?? '', quantity: 'laid_m', value: null, reason: '' } as never,
    url: `/api/projects/${projectId}/production/corrections`,
    savedText: 'Correction saved.',
  });
  return (
    <RecordForm rf={rf} title="Correct a figure" submitLabel="Save correction">
      <TextField rf={rf} name="day" label="Day" type="date" />
      <TextField rf={rf} name="crew" label="Crew" hint={crews.length ? `Crews so far: ${crews.map((c) => c || '(none named)').join(', ')}. Leave empty for "no crew named".` : 'Leave empty for "no crew named".'} />
      <SelectField rf={rf} name="quantity" label="What" options={PRODUCTION_QUANTITIES.map((q) => ({ value: q, label: QUANTITY_LABELS[q] }))} />
      <NumberField rf={rf} name="value" label="Corrected figure (metres, or a count for crossings and pits)" />
      <TextField rf={rf} name="reason" label="Reason (required)" multiline />
    </RecordForm>
  );
}
