'use client';

import { useWatch } from 'react-hook-form';
import { Field } from '@/components/ui/primitives';
import { ductJointSchema, type DuctJointInput } from '@/lib/records/duct-schemas';
import type { UnitSystem } from '@/lib/records/units';
import { PositionFields, RecordForm, SelectField, TextField, useRecordForm, type RouteOption } from './record-form';

/**
 * Records a joint or connector: where (the phone's position, or a route and chainage) and which duct
 * positions it joins (large toggles, one per position). A joint at a boundary between installed stretches
 * lets the ducts it names change colour or position there.
 */
export function DuctJointForm({ projectId, routes, system, positions = 12 }: { projectId: string; routes: RouteOption[]; system: UnitSystem; positions?: number }) {
  const defaults = { kind: 'connector', ductPositions: [], note: '' } as unknown as DuctJointInput;
  const rf = useRecordForm({ schema: ductJointSchema, draftKey: `duct-joint:${projectId}`, defaults, url: `/api/projects/${projectId}/duct-joints`, savedText: 'Joint saved.' });
  const chosen = (useWatch({ control: rf.form.control, name: 'ductPositions' as never }) as number[] | undefined) ?? [];
  const error = (rf.form.formState.errors as { ductPositions?: { message?: string } }).ductPositions?.message;
  const toggle = (n: number) => {
    const next = chosen.includes(n) ? chosen.filter((x) => x !== n) : [...chosen, n].sort((a, b) => a - b);
    rf.form.setValue('ductPositions' as never, next as never, { shouldDirty: true });
  };
  return (
    <RecordForm rf={rf} title="Record a joint or connector" submitLabel="Save joint">
      <PositionFields rf={rf} routes={routes} system={system} />
      <SelectField rf={rf} name={'kind' as never} label="Kind" options={[{ value: 'connector', label: 'Connector (a coupler on the ducts in the trench)' }, { value: 'joint', label: 'Joint (a chamber or closure where ducts are joined)' }]} />
      <Field label="Ducts joined (positions in the bundle)" htmlFor="joint-positions" error={error}>
        <div id="joint-positions" role="group" aria-label="Ducts joined" className="grid grid-cols-6 gap-2">
          {Array.from({ length: positions }, (_, i) => i + 1).map((n) => (
            <button
              key={n}
              type="button"
              aria-pressed={chosen.includes(n)}
              onClick={() => toggle(n)}
              className={`min-h-12 rounded-md border text-base ${chosen.includes(n) ? 'border-ink bg-ink text-white' : 'border-ink/20 bg-white'}`}
            >
              {n}
            </button>
          ))}
        </div>
      </Field>
      <TextField rf={rf} name={'note' as never} label="Note" multiline />
    </RecordForm>
  );
}
