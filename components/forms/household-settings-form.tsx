'use client';

import { z } from 'zod';
import { householdSettingsSchema } from '@/lib/records/household-settings';
import type { UnitSystem } from '@/lib/records/units';
import { NumberField, RecordForm, useRecordForm } from './record-form';

type Values = z.input<typeof householdSettingsSchema>;

/** How addresses are tied to routes and counted as passed; sent as `{ households: {...} }` to PATCH /api/projects/{id}. */
export function HouseholdSettingsForm({ projectId, initial, system }: { projectId: string; initial: Values; system: UnitSystem }) {
  const rf = useRecordForm({
    schema: householdSettingsSchema,
    draftKey: `household-settings:${projectId}`,
    defaults: initial,
    url: `/api/projects/${projectId}`,
    method: 'PATCH',
    transform: (v) => ({ households: v }),
    savedText: 'Household settings saved; households passed are being worked out again.',
  });
  return (
    <RecordForm rf={rf} label="Household settings" submitLabel="Save household settings">
      <NumberField rf={rf} name="serveDistanceM" label="Serve distance" quantity="length" system={system} hint="How far from its street route an address may lie and still be served by it (default 40 m)." />
      <NumberField rf={rf} name="crossingServeDistanceM" label="Crossing distance" quantity="length" system={system} hint="How far a built road crossing's end on the route may lie from the foot point of an address across the street to serve it (default 30 m)." />
      <NumberField rf={rf} name="footToleranceM" label="Foot tolerance" quantity="length" system={system} hint="How far short of an address's foot point a built stretch may stop and still pass it (default 2 m)." />
    </RecordForm>
  );
}
