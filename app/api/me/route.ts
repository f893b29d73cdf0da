import { z } from 'zod';
import { withRoute } from '@/lib/api/with-route';
import { setOwnUnitSystem } from '@/lib/services/users';

export const GET = withRoute({ action: 'project.read' }, async ({ principal }) => ({ user: principal }));

// A person's own choice of units (null: follow each project's).
export const PATCH = withRoute(
  { action: 'project.read', body: z.object({ unitSystem: z.enum(['metric', 'imperial'], { message: 'Pick metric or imperial, or null to follow each project.' }).nullable() }).strict() },
  async ({ db, principal, body }) => ({ user: await setOwnUnitSystem(db, principal, body.unitSystem) }),
);
