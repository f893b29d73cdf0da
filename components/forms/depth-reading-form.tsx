'use client';

import { DateTimeField, NumberField, PositionFields, RecordForm, TextField, useRecordForm, type RouteOption } from './record-form';
import { depthReadingSchema } from '@/lib/records/depth-schemas';
import { formatQuantity, type UnitSystem } from '@/lib/records/units';

/** A depth reading typed at the kerb: by position ("Use my position") or route and chainage; cover and/or trench depth. */
export function DepthReadingForm({ projectId, routes, system, minCoverM }: { projectId: string; routes: RouteOption[]; system: UnitSystem; minCoverM: number }) {
  const rf = useRecordForm({
    schema: depthReadingSchema,
    draftKey: `depth-reading:${projectId}`,
    defaults: { coverM: null, trenchDepthM: null, measuredAt: '', note: '' } as never,
    url: `/api/projects/${projectId}/depth-readings`,
    savedText: 'Reading saved.',
  });
  return (
    <RecordForm rf={rf} title="Add a depth reading" submitLabel="Save reading">
      <PositionFields rf={rf} routes={routes} system={system} />
      <NumberField rf={rf} name={'coverM' as never} label="Cover" quantity="depth" system={system} hint={`Surface to the top of the uppermost duct; the project's minimum is ${formatQuantity(minCoverM, 'depth', system)}.`} />
      <NumberField rf={rf} name={'trenchDepthM' as never} label="Trench depth" quantity="depth" system={system} hint="Surface to the bottom of the slot, if measured." />
      <DateTimeField rf={rf} name={'measuredAt' as never} label="Measured at (optional)" hint="On the project's clock." />
      <TextField rf={rf} name={'note' as never} label="Note (optional)" multiline />
    </RecordForm>
  );
}
