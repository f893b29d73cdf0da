import { withRoute } from '@/lib/api/with-route';
import { byTokenParam } from '@/lib/api/scopes';
import { revokeToken } from '@/lib/services/tokens';

export const DELETE = withRoute({ action: 'token.manage', scope: byTokenParam }, async ({ db, principal, params }) => {
  await revokeToken(db, principal, params.tokenId);
  return { revoked: true };
});
