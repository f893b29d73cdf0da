import type { Db } from './client';

/** One feature of an upload with what a record can be taken from: its positions and attributes. */
export interface UploadPointFeature {
  seq: number;
  kind: 'line' | 'point';
  name: string | null;
  /** [lon, lat] per position (one for a point) */
  coords: [number, number][];
  /** ISO times per position, or null */
  times: (string | null)[] | null;
  attributes: Record<string, unknown>;
  /** per-vertex values of a line (survey CSV lines), or null */
  pointAttributes: Record<string, unknown[]> | null;
}

/** The stored features of an upload in file order, e.g. the waypoints of a GPX or the points of a shapefile. */
export async function listUploadPointFeatures(db: Db, uploadId: string): Promise<UploadPointFeature[]> {
  const rows = await db('upload_features').where({ upload_id: uploadId }).orderBy('seq').select('seq', 'kind', 'name', 'times', 'attributes', 'point_attributes', db.raw('ST_AsGeoJSON(geom, 9)::json as geometry'));
  return rows.map((r) => ({
    seq: r.seq,
    kind: r.kind,
    name: r.name,
    coords: r.kind === 'line' ? r.geometry.coordinates : [r.geometry.coordinates],
    times: r.times ? (r.times as (Date | null)[]).map((t) => (t ? t.toISOString() : null)) : null,
    attributes: r.attributes ?? {},
    pointAttributes: r.point_attributes ?? null,
  }));
}
