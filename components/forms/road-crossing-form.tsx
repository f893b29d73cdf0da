'use client';

import { useState } from 'react';
import { Field, Select } from '@/components/ui/primitives';
import { roadCrossingPatchSchema, roadCrossingSchema } from '@/lib/records/road-crossing-schema';
import type { UnitSystem } from '@/lib/records/units';
import { CheckboxField, NumberField, RecordForm, SelectField, TextField, useRecordForm } from './record-form';

export interface CrossingChoice {
  routeId: string;
  routeRef: string;
  street: string | null;
  plannedDucts: string | null;
  record: {
    id: string;
    built: boolean;
    builtOn: string | null;
    lengthM: number | null;
    sawnBeforeMain: boolean | null;
    ductCount: number | null;
    ductSizeId: string | null;
    addressRef: string | null;
    note: string;
  } | null;
}

/**
 * Records a road crossing at the kerb: pick the crossing, then say whether it is built, when, how long it
 * measured, whether it was sawn before the lengthways cut and what ducts it carries. A crossing with a record
 * is edited (PATCH), one without gets its first (POST); each keeps its own draft on the device.
 */
export function RoadCrossingForm({ projectId, crossings, ductSizes, system }: { projectId: string; crossings: CrossingChoice[]; ductSizes: { id: string; label: string }[]; system: UnitSystem }) {
  const [routeId, setRouteId] = useState(crossings.find((c) => !c.record)?.routeId ?? crossings[0]?.routeId ?? '');
  const chosen = crossings.find((c) => c.routeId === routeId);
  return (
    <div className="flex max-w-xl flex-col gap-4">
      <Field label="Crossing" htmlFor="crossing-pick" hint={chosen ? `${chosen.record ? 'Has a record: saving changes it.' : 'Not recorded yet.'}${chosen.plannedDucts ? ` Planned ducts: ${chosen.plannedDucts}.` : ''}` : undefined}>
        <Select id="crossing-pick" value={routeId} onChange={(e) => setRouteId(e.target.value)} className="min-h-12 text-base">
          {crossings.map((c) => (
            <option key={c.routeId} value={c.routeId}>
              {c.routeRef}
              {c.street ? ` · ${c.street}` : ''}
              {c.record ? (c.record.built ? ' (built)' : ' (recorded, not built)') : ' (not built yet)'}
            </option>
          ))}
        </Select>
      </Field>
      {chosen && <CrossingFields key={chosen.routeId} projectId={projectId} crossing={chosen} ductSizes={ductSizes} system={system} />}
    </div>
  );
}

function CrossingFields({ projectId, crossing, ductSizes, system }: { projectId: string; crossing: CrossingChoice; ductSizes: { id: string; label: string }[]; system: UnitSystem }) {
  const r = crossing.record;
  const defaults = {
    built: r?.built ?? true,
    builtOn: r?.builtOn ?? '',
    lengthM: r?.lengthM ?? null,
    sawnBeforeMain: r?.sawnBeforeMain ?? true,
    ductCount: r?.ductCount ?? null,
    ductSizeId: r?.ductSizeId ?? '',
    addressRef: r?.addressRef ?? '',
    note: r?.note ?? '',
  };
  const base = `/api/projects/${projectId}/road-crossings`;
  const rf = useRecordForm({
    schema: r ? roadCrossingPatchSchema : roadCrossingSchema,
    draftKey: `crossing:${projectId}:${crossing.routeId}`,
    defaults: (r ? defaults : { ...defaults, routeId: crossing.routeId }) as never,
    url: r ? `${base}/${r.id}` : base,
    method: r ? 'PATCH' : 'POST',
    savedText: `Crossing ${crossing.routeRef} saved.`,
  });
  return (
    <RecordForm rf={rf} title={`Crossing ${crossing.routeRef}`} submitLabel={r ? 'Save changes' : 'Record crossing'}>
      <CheckboxField rf={rf} name="built" label="Built (sawn, ducts laid, closed)" />
      <TextField rf={rf} name="builtOn" label="Date built" type="date" />
      <NumberField rf={rf} name="lengthM" label="Measured length" quantity="length" system={system} hint="As measured on site; leave empty if not measured." />
      <CheckboxField rf={rf} name="sawnBeforeMain" label="Sawn before the lengthways cut" />
      <NumberField rf={rf} name="ductCount" label="Number of ducts" step="1" />
      <SelectField rf={rf} name="ductSizeId" label="Duct size" placeholder="Not recorded" options={ductSizes.map((s) => ({ value: s.id, label: s.label }))} />
      <TextField rf={rf} name="addressRef" label="Address served" hint="Until the address register links it, e.g. 14 Lanternfield Road." />
      <TextField rf={rf} name="note" label="Note" multiline />
    </RecordForm>
  );
}
