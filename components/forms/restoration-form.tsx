'use client';

import { useFieldArray } from 'react-hook-form';
import { Button } from '@/components/ui/primitives';
import { restorationPatchSchema, restorationSchema } from '@/lib/records/restoration-schema';
import type { UnitSystem } from '@/lib/records/units';
import { DateTimeField, NumberField, RecordForm, RouteStretchFields, SelectField, TextField, useRecordForm, type RouteOption } from './record-form';

/**
 * Records the restoration of a stretch at the kerb: the route and stretch, when the edges were cleaned and
 * the surface laid (on the project's clock), the backfill from the project's catalogue, the compaction passes,
 * the required and laid thickness, and as many laying temperature readings as were taken (°F on imperial
 * projects; sent as °C). The draft stays on the device until the server has it.
 */
/** A recorded restoration as the form edits it: times already written on the project's clock (`YYYY-MM-DDTHH:mm`). */
export interface RestorationDraft {
  id: string;
  label: string;
  routeId: string;
  fromChainageM: number;
  toChainageM: number;
  restoredAt: string;
  backfillMaterialId: string | null;
  compactionPasses: number;
  requiredThicknessMm: number;
  laidThicknessMm: number | null;
  edgesCleanedAt: string;
  surfaceLaidAt: string;
  crew: string;
  note: string;
  temperatures: { tempC: number; measuredAt: string }[];
}

export function RestorationForm({ projectId, routes, materials, system, defaults, timeZone, record }: {
  projectId: string;
  /** given: the form changes this restoration (PATCH; the route stays) */
  record?: RestorationDraft;
  routes: RouteOption[];
  materials: { id: string; label: string }[];
  system: UnitSystem;
  defaults: { compactionPasses: number; requiredThicknessMm: number };
  timeZone: string;
}) {
  const base = `/api/projects/${projectId}/restorations`;
  const rf = useRecordForm({
    schema: (record ? restorationPatchSchema : restorationSchema) as typeof restorationSchema,
    draftKey: record ? `restoration:${projectId}:${record.id}` : `restoration:${projectId}`,
    defaults: (record
      ? { ...record, backfillMaterialId: record.backfillMaterialId ?? '' }
      : {
          routeId: '', fromChainageM: null, toChainageM: null, restoredAt: '', backfillMaterialId: '', compactionPasses: defaults.compactionPasses,
          requiredThicknessMm: defaults.requiredThicknessMm, laidThicknessMm: null, edgesCleanedAt: '', surfaceLaidAt: '', crew: '', note: '', temperatures: [],
        }) as never,
    url: record ? `${base}/${record.id}` : base,
    method: record ? 'PATCH' : 'POST',
    savedText: record ? 'Changes saved.' : 'Restoration saved.',
  });
  const readings = useFieldArray({ control: rf.form.control as never, name: 'temperatures' as never });
  const clock = `on the project's clock (${timeZone})`;
  return (
    <RecordForm rf={rf} title={record ? `Change the restoration of ${record.label}` : 'Record a restoration'} submitLabel={record ? 'Save changes' : 'Save restoration'}>
      {record ? (
        <>
          <NumberField rf={rf} name="fromChainageM" label="From chainage" quantity="length" system={system} />
          <NumberField rf={rf} name="toChainageM" label="To chainage" quantity="length" system={system} />
        </>
      ) : (
        <RouteStretchFields rf={rf} routes={routes} system={system} />
      )}
      <DateTimeField rf={rf} name="restoredAt" label="Date and time of the restoration" hint={clock} />
      <DateTimeField rf={rf} name="edgesCleanedAt" label="Edges cleaned at" hint={clock} />
      <DateTimeField rf={rf} name="surfaceLaidAt" label="Surface laid at" hint={clock} />
      <SelectField rf={rf} name="backfillMaterialId" label="Backfill material" placeholder="Not recorded" options={materials.map((m) => ({ value: m.id, label: m.label }))} />
      <NumberField rf={rf} name="compactionPasses" label="Compaction passes" step="1" />
      <NumberField rf={rf} name="requiredThicknessMm" label="Required surface thickness" quantity="small" system={system} />
      <NumberField rf={rf} name="laidThicknessMm" label="Laid surface thickness" quantity="small" system={system} hint="As measured; leave empty if not measured." />
      <fieldset className="flex flex-col gap-3">
        <legend className="mb-2 text-sm font-medium">Laying temperatures</legend>
        {readings.fields.length === 0 && <p className="text-sm text-ink-soft">No reading yet: a restoration without one is a warning.</p>}
        {readings.fields.map((f, i) => (
          <div key={f.id} className="flex flex-col gap-2 rounded-md border border-ink/10 p-3">
            <NumberField rf={rf} name={`temperatures.${i}.tempC` as never} label={`Reading ${i + 1}`} quantity="temperature" system={system} />
            <DateTimeField rf={rf} name={`temperatures.${i}.measuredAt` as never} label="Taken at (optional)" />
            <Button type="button" variant="secondary" className="min-h-12" onClick={() => readings.remove(i)}>
              Remove reading {i + 1}
            </Button>
          </div>
        ))}
        <Button type="button" variant="secondary" className="min-h-12 text-base" onClick={() => readings.append({ tempC: null, measuredAt: '' } as never)}>
          Add a temperature reading
        </Button>
      </fieldset>
      <TextField rf={rf} name="crew" label="Crew" />
      <TextField rf={rf} name="note" label="Note" multiline />
    </RecordForm>
  );
}
