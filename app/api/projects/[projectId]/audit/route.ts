import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { listAuditForProject } from '@/db/audit';

export const GET = withRoute({ action: 'audit.read', scope: byProjectParam }, async ({ db, project }) => ({
  entries: await listAuditForProject(db, project.id),
}));
