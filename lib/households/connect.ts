import { z } from 'zod';
import { plausibleDate } from '@/lib/records/plausible-ranges';

/** A drop recorded as installed by hand (or taken back): the body of PATCH /api/projects/{id}/addresses/{addressId}. */
export const connectSchema = z
  .object({
    connected: z.boolean({ message: 'Say whether the drop is installed (connected: true or false).' }),
    connectedOn: plausibleDate('the date the drop was installed').optional(),
  })
  .refine((v) => v.connected || v.connectedOn === undefined, { message: 'A drop not installed has no date installed.', path: ['connectedOn'] });
