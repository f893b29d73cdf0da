import { getDb } from '@/db/client';
import { withPublicRoute } from '@/lib/api/with-route';
import { readJsonBody } from '@/lib/api/read-body';
import { env } from '@/lib/env';
import { acceptLinkSchema, acceptUserLink } from '@/lib/services/users';

// Public: the one-time link itself is the credential.
export const POST = withPublicRoute(async (req) =>
  acceptUserLink(getDb(), acceptLinkSchema.parse(await readJsonBody(req, env().JSON_MAX_BYTES))),
);
