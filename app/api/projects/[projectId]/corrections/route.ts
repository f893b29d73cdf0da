import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { listCorrections } from '@/db/corrections';

// The project's corrections, newest first, withdrawn ones included (with withdrawnAt).
export const GET = withRoute({ action: 'section.read', scope: byProjectParam }, async ({ db, project }) => ({ corrections: await listCorrections(db, project.id) }));
