import { withRoute } from '@/lib/api/with-route';
import { byOrgChangeParam } from '@/lib/api/scopes';
import { answerOrgChange, answerOrgChangeSchema } from '@/lib/services/org-changes';

export const PATCH = withRoute({ action: 'project.manage', scope: byOrgChangeParam, body: answerOrgChangeSchema }, async ({ db, principal, project, params, body }) =>
  answerOrgChange(db, principal, project, Number(params.changeId), body),
);
