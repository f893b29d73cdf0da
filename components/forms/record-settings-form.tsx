'use client';

import { z } from 'zod';
import { recordSettingsFormSchema } from '@/lib/records/record-settings';
import type { UnitSystem } from '@/lib/records/units';
import { NumberField, RecordForm, SelectField, useRecordForm } from './record-form';

type Values = z.input<typeof recordSettingsFormSchema>;

/** The settings the trench records are checked against; sent as `{ records: {...} }` to PATCH /api/projects/{id}. */
export function RecordSettingsForm({ projectId, initial, sequences, system }: { projectId: string; initial: Values; sequences: { id: string; name: string }[]; system: UnitSystem }) {
  const rf = useRecordForm({
    schema: recordSettingsFormSchema,
    draftKey: `record-settings:${projectId}`,
    defaults: initial,
    url: `/api/projects/${projectId}`,
    method: 'PATCH',
    transform: (v) => ({ records: v }),
    savedText: 'Record settings saved.',
  });
  return (
    <RecordForm rf={rf} label="Record settings" submitLabel="Save record settings">
      <NumberField rf={rf} name="trenchWidthMm" label="Trench width" quantity="small" system={system} hint="A micro-trench slot is typically about 24 mm wide [common practice]." />
      <NumberField rf={rf} name="trenchDepthMm" label="Trench depth" quantity="small" system={system} hint="Typically about 480 mm deep [common practice]. Spoil and backfill volumes use width × depth × length." />
      <NumberField rf={rf} name="minClearanceM" label="Minimum clearance to other utilities" quantity="depth" system={system} hint="As the utility owners and your local code require." />
      <NumberField rf={rf} name="gapThresholdM" label="Longest gap between built stretches" quantity="length" system={system} />
      <NumberField rf={rf} name="restorationMaxDelayMin" label="Longest wait from cleaning the slot's edges to laying the surface (minutes)" />
      <NumberField rf={rf} name="layingTempTargetC" label="Laying temperature target" quantity="temperature" system={system} hint="Hot bituminous material is laid at around 195 °C [common practice]; follow the supplier's data sheet." />
      <NumberField rf={rf} name="layingTempToleranceC" label="Laying temperature tolerance (±)" quantity="temperatureDifference" system={system} />
      <NumberField rf={rf} name="compactionPassesDefault" label="Compaction passes (default)" />
      <NumberField rf={rf} name="surfaceThicknessMm" label="Required surface thickness" quantity="small" system={system} />
      <SelectField rf={rf} name="colourSequenceId" label="Duct colour sequence" options={sequences.map((s) => ({ value: s.id, label: s.name }))} />
    </RecordForm>
  );
}
