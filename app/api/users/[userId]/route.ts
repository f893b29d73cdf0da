import { withRoute } from '@/lib/api/with-route';
import { byUserParam } from '@/lib/api/scopes';
import { env } from '@/lib/env';
import { changeUser, updateUserSchema } from '@/lib/services/users';

export const PATCH = withRoute(
  { action: 'user.manage', scope: byUserParam, body: updateUserSchema },
  async ({ db, principal, params, body }) => changeUser(db, principal, params.userId, body, env().LINK_TTL_HOURS),
);
