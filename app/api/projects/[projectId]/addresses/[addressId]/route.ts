import { byProjectRecord } from '@/lib/api/scopes';
import { withRoute } from '@/lib/api/with-route';
import { connectAddress, connectSchema } from '@/lib/services/households';

// PATCH: records the address's drop as installed (or takes it back), by hand; the figures follow (queued)
export const PATCH = withRoute({ action: 'address.connect', scope: byProjectRecord('addresses', 'addressId'), side: 'contractor', body: connectSchema }, async ({ db, principal, project, params, body }) => ({
  address: await connectAddress(db, principal, project, params.addressId, body),
}));
