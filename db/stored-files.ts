import type { Db } from './client';

/**
 * Every table that names a file in the originals store, with its key column. A file no row names is an
 * orphan (a request killed between storing the bytes and committing the row). A new kind of stored
 * original (photos, …) adds its table here.
 */
const ORIGINAL_KEY_COLUMNS = [
  { table: 'upload_files', column: 'storage_key' },
  { table: 'plan_version_files', column: 'storage_key' },
  // photos (issue 14): the original and its thumbnail
  { table: 'photos', column: 'storage_key' },
  { table: 'photos', column: 'thumbnail_key' },
  // the address register's imports (issue 15)
  { table: 'address_imports', column: 'storage_key' },
  // handover packages (issue 16): the issued ZIP
  { table: 'handovers', column: 'storage_key' },
] as const;

/** Of the given keys of the originals store, those a committed row names. */
export async function committedOriginalKeys(db: Db, keys: string[]): Promise<Set<string>> {
  const found = new Set<string>();
  if (keys.length === 0) return found;
  for (const { table, column } of ORIGINAL_KEY_COLUMNS) {
    const rows = await db(table).whereIn(column, keys).select(`${column} as key`);
    for (const r of rows) found.add(r.key);
  }
  return found;
}

/** Of the given keys of the exports store, those a job's result names. */
export async function committedExportKeys(db: Db, keys: string[]): Promise<Set<string>> {
  if (keys.length === 0) return new Set();
  const rows = await db('jobs').whereRaw("result->>'storageKey' = any(?)", [keys]).select(db.raw("result->>'storageKey' as key"));
  return new Set(rows.map((r: { key: string }) => r.key));
}
