'use client';

import { NumberField, PositionFields, RecordForm, SelectField, TextField, useRecordForm, type RouteOption } from './record-form';
import { testPitSchema, utilityCrossingSchema } from '@/lib/records/pit-schemas';
import { formatQuantity, type UnitSystem } from '@/lib/records/units';

const PIT_METHOD_OPTIONS = [
  { value: 'hand_dug', label: 'Dug by hand' },
  { value: 'vacuum', label: 'Vacuum excavation' },
  { value: 'other', label: 'Other' },
];
const FOUND_BY_OPTIONS = [
  { value: 'gpr', label: 'Ground-penetrating radar' },
  { value: 'test_pit', label: 'In a test pit' },
  { value: 'records', label: "The owner's records" },
  { value: 'other', label: 'Other' },
];

/** A test pit: where, the day dug, how, how deep and what was found. */
export function TestPitForm({ projectId, routes, system }: { projectId: string; routes: RouteOption[]; system: UnitSystem }) {
  const rf = useRecordForm({
    schema: testPitSchema,
    draftKey: `test-pit:${projectId}`,
    defaults: { name: '', dugOn: '', method: 'hand_dug', depthM: null, findings: '' } as never,
    url: `/api/projects/${projectId}/test-pits`,
    savedText: 'Test pit saved.',
  });
  return (
    <RecordForm rf={rf} title="Add a test pit" submitLabel="Save test pit">
      <PositionFields rf={rf} routes={routes} system={system} />
      <TextField rf={rf} name={'name' as never} label="Name (optional)" hint="e.g. TP-3, as marked on site." />
      <TextField rf={rf} name={'dugOn' as never} label="Day dug" type="date" />
      <SelectField rf={rf} name={'method' as never} label="How it was dug" options={PIT_METHOD_OPTIONS} />
      <NumberField rf={rf} name={'depthM' as never} label="Depth of the pit" quantity="depth" system={system} />
      <TextField rf={rf} name={'findings' as never} label="Findings" multiline hint="What lies in the ground there: utilities, their depth, the ground." />
    </RecordForm>
  );
}

/** A utility found by radar, in a pit or from records; the kind from the project's catalogue. */
export function UtilityCrossingForm({ projectId, routes, system, kinds, pits, minClearanceM }: { projectId: string; routes: RouteOption[]; system: UnitSystem; kinds: { id: string; label: string }[]; pits: { id: string; label: string }[]; minClearanceM: number }) {
  const rf = useRecordForm({
    schema: utilityCrossingSchema,
    draftKey: `utility-crossing:${projectId}`,
    defaults: { utilityKindId: '', pitId: '', owner: '', depthM: null, clearanceM: null, method: 'gpr', foundOn: '', note: '' } as never,
    url: `/api/projects/${projectId}/utility-crossings`,
    savedText: 'Utility saved. The table warns where the clearance is below the minimum.',
  });
  return (
    <RecordForm rf={rf} title="Add a utility found" submitLabel="Save utility">
      <PositionFields rf={rf} routes={routes} system={system} />
      <SelectField rf={rf} name={'utilityKindId' as never} label="Kind of utility" placeholder="Pick the kind" options={kinds.map((k) => ({ value: k.id, label: k.label }))} />
      <TextField rf={rf} name={'owner' as never} label="Owner (optional)" />
      <SelectField rf={rf} name={'method' as never} label="Found by" options={FOUND_BY_OPTIONS} />
      {pits.length > 0 && <SelectField rf={rf} name={'pitId' as never} label="Test pit (optional)" placeholder="None" options={pits.map((p) => ({ value: p.id, label: p.label }))} />}
      <NumberField rf={rf} name={'depthM' as never} label="Depth to the top of the utility" quantity="depth" system={system} />
      <NumberField rf={rf} name={'clearanceM' as never} label="Vertical clearance to our ducts" quantity="depth" system={system} hint={`The project's minimum is ${formatQuantity(minClearanceM, 'depth', system)}.`} />
      <TextField rf={rf} name={'foundOn' as never} label="Day found" type="date" />
      <TextField rf={rf} name={'note' as never} label="Note (optional)" multiline />
    </RecordForm>
  );
}
