'use client';

import { COUNTED, productionCorrectionSchema, PRODUCTION_QUANTITIES, QUANTITY_LABELS, type ProductionQuantity } from '@/lib/records/production';
import { unitOf, type UnitSystem } from '@/lib/records/units';
import { NumberField, RecordForm, SelectField, TextField, useRecordForm } from './record-form';

/**
 * Corrects one figure of a day and crew by hand, with the reason (required). Lengths are typed in the shown
 * unit (m or ft) and sent in metres; crossings and pits are counts. The derived figure stays visible beside
 * the correction.
 */
export function ProductionCorrectionForm({ projectId, crews, system }: { projectId: string; crews: string[]; system: UnitSystem }) {
  const rf = useRecordForm({
    schema: productionCorrectionSchema,
    draftKey: `production-correction:${projectId}`,
    defaults: { day: '', crew: crews[0] ?? '', quantity: 'laid_m', value: null, reason: '' } as never,
    url: `/api/projects/${projectId}/production/corrections`,
    savedText: 'Correction saved.',
  });
  const quantity = (rf.form.watch('quantity') ?? 'laid_m') as ProductionQuantity;
  const counted = COUNTED.has(quantity);
  return (
    <RecordForm rf={rf} title="Correct a figure" submitLabel="Save correction">
      <TextField rf={rf} name="day" label="Day" type="date" />
      <TextField rf={rf} name="crew" label="Crew" hint={crews.length ? `Crews so far: ${crews.map((c) => c || '(none named)').join(', ')}. Leave empty for "no crew named".` : 'Leave empty for "no crew named".'} />
      <SelectField rf={rf} name="quantity" label="What" options={PRODUCTION_QUANTITIES.map((q) => ({ value: q, label: QUANTITY_LABELS[q] }))} />
      {/* a new box when the kind changes: a length and a count are not typed in the same unit */}
      <NumberField key={quantity} rf={rf} name="value" label={counted ? 'Corrected count' : 'Corrected length'} quantity={counted ? undefined : 'length'} system={system} hint={counted ? undefined : `In ${unitOf('length', system)}.`} />
      <TextField rf={rf} name="reason" label="Reason (required)" multiline />
    </RecordForm>
  );
}
