import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { changeProject, updateProjectSchema } from '@/lib/services/projects';

export const GET = withRoute({ action: 'project.read', scope: byProjectParam }, async ({ project }) => ({ project }));

export const PATCH = withRoute(
  { action: 'project.manage', scope: byProjectParam, body: updateProjectSchema },
  async ({ db, principal, project, body }) => ({ project: await changeProject(db, principal, project.id, body) }),
);
