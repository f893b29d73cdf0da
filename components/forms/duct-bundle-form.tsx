'use client';

import { useRouter } from 'next/navigation';
import { useId } from 'react';
import { useFieldArray, useWatch, type Path } from 'react-hook-form';
import { Button, Field, Select } from '@/components/ui/primitives';
import { DuctSwatch } from '@/components/ui/duct-swatch';
import type { DuctColour } from '@/lib/records/duct-colours';
import { DUCT_PURPOSES, ductBundleSchema, type DuctBundleInput } from '@/lib/records/duct-schemas';
import type { UnitSystem } from '@/lib/records/units';
import { CheckboxField, NumberField, RecordForm, RouteStretchFields, TextField, useRecordForm, type RecordFormState, type RouteOption } from './record-form';

export interface SizeOption {
  id: string;
  label: string;
}

export interface PlannedDucts {
  summary: string;
  ducts: { ductSizeId: string | null; outerMm: number; innerMm: number | null; colourPosition: number | null }[];
}

type Values = DuctBundleInput;
type DuctRow = Values['ducts'][number];

const PURPOSE_LABEL: Record<(typeof DUCT_PURPOSES)[number], string> = { feeder: 'Feeder', distribution: 'Distribution', drop: 'Drop', spare: 'Spare' };
const big = 'min-h-12 text-base';

/**
 * Records an installed duct bundle at the kerb: the route and stretch, then the ducts in bundle order (row 1 is
 * position 1), each with a size from the catalogue or a custom one, its colour in the project's sequence and
 * its purpose; "Fill from the plan" copies the planned bundle of the route. Then tracer wire, warning tape and
 * protective fill. The draft stays on the device until the server has it.
 */
export function DuctBundleForm({ projectId, routes, sizes, colours, planned, system, editing }: { projectId: string; routes: RouteOption[]; sizes: SizeOption[]; colours: DuctColour[]; planned: Record<string, PlannedDucts>; system: UnitSystem; editing?: { id: string; values: Values; label: string } }) {
  const router = useRouter();
  const firstDuct = (i: number): DuctRow => ({ ductSizeId: sizes[0]?.id, colourPosition: Math.min(i + 1, colours.length || 1), purpose: 'distribution' });
  const blank = { routeId: '', fromChainageM: undefined, toChainageM: undefined, ducts: [firstDuct(0)], tracerWire: true, warningTape: true, protectiveFill: false, note: '' } as unknown as Values;
  const rf = useRecordForm({
    schema: ductBundleSchema,
    draftKey: editing ? `duct-bundle:${projectId}:${editing.id}` : `duct-bundle:${projectId}`,
    defaults: editing?.values ?? blank,
    url: editing ? `/api/projects/${projectId}/duct-bundles/${editing.id}` : `/api/projects/${projectId}/duct-bundles`,
    method: editing ? 'PATCH' : 'POST',
    savedText: editing ? 'Changes saved.' : 'Bundle saved.',
    // after an edit, back to the page without ?edit=
    onSaved: editing ? () => router.replace(`/projects/${projectId}/records/ducts#bundle-${editing.id}`) : undefined,
  });
  const { fields, append, remove, replace } = useFieldArray({ control: rf.form.control, name: 'ducts' });
  const routeId = useWatch({ control: rf.form.control, name: 'routeId' }) as string | undefined;
  const plan = routeId ? planned[routeId] : undefined;

  return (
    <RecordForm rf={rf} title={editing ? `Change the bundle on ${editing.label}` : 'Record an installed bundle'} submitLabel={editing ? 'Save changes' : 'Save bundle'}>
      <RouteStretchFields rf={rf} routes={routes} system={system} />
      <fieldset className="flex flex-col gap-4">
        <legend className="mb-2 text-sm font-medium">Ducts, in bundle order</legend>
        {plan && (
          <Button
            type="button"
            variant="secondary"
            className={big}
            onClick={() =>
              replace(
                plan.ducts.map((d, i) => ({
                  ductSizeId: d.ductSizeId ?? undefined,
                  outerMm: d.ductSizeId ? undefined : d.outerMm,
                  innerMm: d.ductSizeId ? undefined : (d.innerMm ?? undefined),
                  colourPosition: d.colourPosition ?? i + 1,
                  purpose: 'distribution',
                })) as DuctRow[],
              )
            }
          >
            Fill from the plan ({plan.summary})
          </Button>
        )}
        {fields.map((f, i) => (
          <DuctRowFields key={f.id} rf={rf} index={i} sizes={sizes} colours={colours} system={system} onRemove={fields.length > 1 ? () => remove(i) : undefined} />
        ))}
        <Button type="button" variant="secondary" className={big} onClick={() => append(firstDuct(fields.length))}>
          Add duct
        </Button>
      </fieldset>
      <CheckboxField rf={rf} name="tracerWire" label="Tracer wire laid" />
      <CheckboxField rf={rf} name="warningTape" label="Warning tape laid" />
      <CheckboxField rf={rf} name="protectiveFill" label="Protective fill placed over the ducts" />
      <TextField rf={rf} name="note" label="Note" multiline />
    </RecordForm>
  );
}

function errorAt(rf: RecordFormState<Values>, path: string): string | undefined {
  let e: unknown = rf.form.formState.errors;
  for (const p of path.split('.')) e = (e as Record<string, unknown> | undefined)?.[p];
  return (e as { message?: string } | undefined)?.message;
}

function DuctRowFields({ rf, index, sizes, colours, system, onRemove }: { rf: RecordFormState<Values>; index: number; sizes: SizeOption[]; colours: DuctColour[]; system: UnitSystem; onRemove?: () => void }) {
  const id = useId();
  const p = (k: string) => `ducts.${index}.${k}` as Path<Values>;
  const sizeId = useWatch({ control: rf.form.control, name: p('ductSizeId') }) as string | undefined;
  const colourPosition = useWatch({ control: rf.form.control, name: p('colourPosition') }) as number | undefined;
  const colour = colours.find((c) => c.position === Number(colourPosition));
  const asNumber = { setValueAs: (v: string) => (v === '' ? undefined : Number(v)) };
  return (
    <div className="flex flex-col gap-3 rounded-md border border-ink/15 p-3" role="group" aria-label={`Duct ${index + 1}`}>
      <div className="flex items-center justify-between">
        <span className="text-sm font-semibold">Duct {index + 1}</span>
        {onRemove && (
          <Button type="button" variant="secondary" className="min-h-10" onClick={onRemove}>
            Remove duct {index + 1}
          </Button>
        )}
      </div>
      <Field label="Size" htmlFor={`${id}-size`} error={errorAt(rf, `ducts.${index}.ductSizeId`)}>
        <Select id={`${id}-size`} {...rf.form.register(p('ductSizeId'))} className={big}>
          {sizes.map((s) => (
            <option key={s.id} value={s.id}>
              {s.label}
            </option>
          ))}
          <option value="">Custom size…</option>
        </Select>
      </Field>
      {!sizeId && (
        <>
          <NumberField rf={rf} name={p('outerMm')} label="Outer diameter" quantity="small" system={system} />
          <NumberField rf={rf} name={p('innerMm')} label="Inner diameter" quantity="small" system={system} />
        </>
      )}
      <Field label="Colour" htmlFor={`${id}-colour`} error={errorAt(rf, `ducts.${index}.colourPosition`)} hint={colour ? undefined : 'Pick the colour of the duct’s sheath.'}>
        <Select id={`${id}-colour`} {...rf.form.register(p('colourPosition'), asNumber)} className={big}>
          <option value="">Pick the colour</option>
          {colours.map((c) => (
            <option key={c.position} value={c.position}>
              {c.position}. {c.label}
            </option>
          ))}
        </Select>
      </Field>
      {colour && <DuctSwatch label={colour.label} hex={colour.hex} marking={colour.marking} />}
      <Field label="Purpose" htmlFor={`${id}-purpose`} error={errorAt(rf, `ducts.${index}.purpose`)}>
        <Select id={`${id}-purpose`} {...rf.form.register(p('purpose'))} className={big}>
          {DUCT_PURPOSES.map((x) => (
            <option key={x} value={x}>
              {PURPOSE_LABEL[x]}
            </option>
          ))}
        </Select>
      </Field>
    </div>
  );
}
