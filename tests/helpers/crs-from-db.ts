import { getDb } from '@/db/client';
import type { CrsDefinition, ParseOptions } from '@/lib/ingest/types';

/**
 * A CRS definition from PostGIS's spatial_ref_sys, the catalogue the product uses, or undefined.
 * The name is the first quoted string of srtext ('WGS 84 / UTM zone 33N').
 */
export async function crsFromDb(srid: number): Promise<CrsDefinition | undefined> {
  const row = await getDb()
    .select('srid', 'auth_name', 'srtext', 'proj4text')
    .from('spatial_ref_sys')
    .where({ srid })
    .first<{ srid: number; auth_name: string; srtext: string; proj4text: string } | undefined>();
  if (!row) return undefined;
  return { srid: row.srid, name: /"([^"]*)"/.exec(row.srtext)?.[1] ?? `${row.auth_name}:${row.srid}`, proj4: row.proj4text.trim() };
}

/** ParseOptions for tests: the database catalogue and generous limits, overridable. */
export function ingestOptions(over: Partial<ParseOptions> = {}): ParseOptions {
  return { resolveCrs: crsFromDb, limits: { maxInflatedBytes: 20 * 1024 * 1024, maxZipEntries: 1000 }, ...over };
}
