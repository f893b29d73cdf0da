import { withRoute } from '@/lib/api/with-route';
import { organisationContactSchema, ownOrganisation, setOwnContact } from '@/lib/services/organisations';

// The person's own organisation with its contact (shown in the duct lookup beside the network it owns).
export const GET = withRoute({ action: 'project.read' }, async ({ db, principal }) => ({ organisation: await ownOrganisation(db, principal) }));

// Its administrators set the contact.
export const PATCH = withRoute({ action: 'user.manage', body: organisationContactSchema }, async ({ db, principal, body }) => ({
  organisation: await setOwnContact(db, principal, body),
}));
