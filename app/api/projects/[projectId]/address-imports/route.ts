import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { listAddressImports } from '@/db/address-imports';

// The project's address imports, newest first, each with its counts.
export const GET = withRoute({ action: 'address.read', scope: byProjectParam }, async ({ db, project }) => ({ imports: await listAddressImports(db, project.id) }));
