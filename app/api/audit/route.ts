import { withRoute } from '@/lib/api/with-route';
import { listAuditForOrganisation } from '@/db/audit';

// Entries about the organisation itself (users, tokens), not tied to a project.
export const GET = withRoute({ action: 'audit.read' }, async ({ db, principal }) => ({
  entries: await listAuditForOrganisation(db, principal.organisationId),
}));
