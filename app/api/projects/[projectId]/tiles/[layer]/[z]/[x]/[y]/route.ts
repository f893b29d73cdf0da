import { createHash } from 'node:crypto';
import { byProjectParam, withRoute } from '@/lib/api/with-route';
import { AppError } from '@/lib/api/errors';
import { etagMatches, parseTileParams } from '@/lib/tiles/params';
import { projectTile } from '@/db/tiles';

export const dynamic = 'force-dynamic';

/**
 * GET /api/projects/{projectId}/tiles/{layer}/{z}/{x}/{y}.mvt: a Mapbox Vector Tile of the project made by
 * PostGIS (db/tiles.ts). An empty tile is 200 with zero bytes; a matching If-None-Match is 304 with no body.
 */
export const GET = withRoute({ action: 'project.read', scope: byProjectParam }, async ({ req, db, project, params }) => {
  const parsed = parseTileParams(params);
  if (!parsed.ok) throw new AppError('bad_parameter', parsed.message, [{ path: parsed.param, message: parsed.message }]);
  const bytes = await projectTile(db, project.id, parsed.tile);
  const etag = `"${createHash('sha256').update(bytes).digest('hex')}"`;
  const headers = { etag, 'cache-control': 'private, max-age=60', 'content-type': 'application/vnd.mapbox-vector-tile' };
  if (etagMatches(req.headers.get('if-none-match'), etag)) return new Response(null, { status: 304, headers });
  return new Response(new Uint8Array(bytes), { status: 200, headers });
});
