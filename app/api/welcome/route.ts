import { getDb } from '@/db/client';
import { withPublicRoute } from '@/lib/api/with-route';
import { AppError } from '@/lib/api/errors';
import { acceptLinkSchema, acceptUserLink } from '@/lib/services/users';

// Public: the one-time link itself is the credential.
export const POST = withPublicRoute(async (req) => {
  let json: unknown;
  try {
    json = await req.json();
  } catch {
    throw new AppError('bad_json', 'The request body is not valid JSON.');
  }
  return acceptUserLink(getDb(), acceptLinkSchema.parse(json));
});
