import { withRoute } from '@/lib/api/with-route';

export const GET = withRoute({ action: 'project.read' }, async ({ principal }) => ({ user: principal }));
