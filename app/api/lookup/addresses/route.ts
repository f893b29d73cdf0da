import { withRoute } from '@/lib/api/with-route';
import { lookupParams } from '@/lib/api/lookup-params';
import { addressSearchQuery, lookupAddresses } from '@/lib/services/lookup';

// across every project the person's organisation may see; no object scope: the service limits to those
export const GET = withRoute({ action: 'lookup.read' }, async ({ req, db, principal }) => ({
  candidates: await lookupAddresses(db, principal, lookupParams(req, addressSearchQuery)),
}));
