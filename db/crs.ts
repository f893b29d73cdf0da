import type { Db } from './client';
import type { CrsDefinition } from '@/lib/ingest/types';

const NAME_SQL = `coalesce((regexp_match(srtext, '^[A-Z_]+\\["([^"]+)"'))[1], auth_name || ':' || auth_srid)`;

/** A coordinate system from PostGIS's spatial_ref_sys, the offline catalogue of EPSG definitions. */
export async function getCrsDefinition(db: Db, srid: number): Promise<CrsDefinition | undefined> {
  const row = await db('spatial_ref_sys')
    .where({ srid, auth_name: 'EPSG' })
    .whereNot('proj4text', '')
    .first('srid', db.raw(`${NAME_SQL} as name`), 'proj4text');
  return row && { srid: row.srid, name: row.name, proj4: row.proj4text.trim() };
}

export interface CrsSummary {
  code: string;
  name: string;
  /** 'projected' or 'geographic' */
  kind: string;
  units: string;
}

/** Searches the catalogue by EPSG code or by words of the name, e.g. "25832", "utm 33", "new york ftus". */
export async function searchCrs(db: Db, q: string, limit = 30): Promise<CrsSummary[]> {
  const words = q.trim().split(/\s+/).filter(Boolean).slice(0, 6);
  const query = db('spatial_ref_sys')
    .where({ auth_name: 'EPSG' })
    .whereNot('proj4text', '')
    .select(
      'srid',
      db.raw(`${NAME_SQL} as name`),
      db.raw(`case when srtext like 'PROJCS%' then 'projected' else 'geographic' end as kind`),
      db.raw(`case when proj4text like '%+units=us-ft%' then 'US survey foot' when proj4text like '%+units=ft%' then 'foot' when proj4text like '%+proj=longlat%' then 'degree' else 'metre' end as units`),
    )
    .orderBy('srid')
    .limit(limit);
  for (const w of words) {
    if (/^\d+$/.test(w)) query.where((b) => b.whereRaw('srid::text like ?', [`${w}%`]).orWhereRaw('srtext ilike ?', [`%${w}%`]));
    else query.whereRaw('srtext ilike ?', [`%${w.replace(/[%_\\]/g, (c) => `\\${c}`)}%`]);
  }
  const rows = await query;
  return rows.map((r: { srid: number; name: string; kind: string; units: string }) => ({ code: `EPSG:${r.srid}`, name: r.name, kind: r.kind, units: r.units }));
}
