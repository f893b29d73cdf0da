'use client';

import { z } from 'zod';
import { connectSchema } from '@/lib/households/connect';
import { CheckboxField, RecordForm, TextField, emptyToUndefined, useRecordForm } from './record-form';

const formSchema = z.object({
  connected: z.boolean(),
  connectedOn: z.preprocess(emptyToUndefined, connectSchema.shape.connectedOn),
});

/** Records the address's drop as installed (with the date) or takes it back; PATCH /api/projects/{id}/addresses/{addressId}. */
export function ConnectAddressForm({ projectId, addressId, connected, connectedOn }: { projectId: string; addressId: string; connected: boolean; connectedOn: string | null }) {
  const rf = useRecordForm({
    schema: formSchema,
    draftKey: `connect:${addressId}`,
    defaults: { connected, connectedOn: connectedOn ?? undefined },
    url: `/api/projects/${projectId}/addresses/${addressId}`,
    method: 'PATCH',
    transform: (v) => (v.connected ? { connected: true, ...(v.connectedOn ? { connectedOn: v.connectedOn } : {}) } : { connected: false }),
    savedText: 'Saved; the figures are being worked out again.',
  });
  return (
    <RecordForm rf={rf} label="Drop installed" submitLabel="Save">
      <CheckboxField rf={rf} name="connected" label="The drop to this address is installed" />
      <TextField rf={rf} name="connectedOn" label="Installed on" type="date" hint="Leave empty for today; cleared when the drop is not installed." />
    </RecordForm>
  );
}
