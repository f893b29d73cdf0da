import type { Knex } from 'knex';
import type { Db } from './client';
import type { RegisterAddress } from '@/lib/households/address-diff';

/** The write side of the address register's import: imports, streets, addresses by key, history. */

export interface AddressImportCounts {
  rows: number;
  added: number;
  changed: number;
  removed: number;
  restored: number;
  unchanged: number;
}

export interface AddressImport {
  id: string;
  projectId: string;
  fileName: string;
  sha256: string;
  sizeBytes: number;
  format: 'csv' | 'geojson' | 'shapefile';
  crs: string;
  mapping: Record<string, string>;
  mappingGuessed: boolean;
  /** an import that only added and updated (removed nothing) */
  partial: boolean;
  counts: AddressImportCounts;
  warnings: string[];
  importedBy: string | null;
  importedByName: string | null;
  createdAt: string;
}

interface ImportRow {
  id: string; project_id: string; file_name: string; sha256: string; size_bytes: string | number; storage_key: string; format: AddressImport['format'];
  crs: string; mapping: Record<string, string>; mapping_guessed: boolean; partial: boolean; counts: AddressImportCounts; warnings: string[];
  imported_by: string | null; imported_by_name: string | null; created_at: Date;
}

const toDto = (r: ImportRow): AddressImport => ({
  id: r.id, projectId: r.project_id, fileName: r.file_name, sha256: r.sha256, sizeBytes: Number(r.size_bytes), format: r.format, crs: r.crs,
  mapping: r.mapping, mappingGuessed: r.mapping_guessed, partial: r.partial, counts: r.counts, warnings: r.warnings,
  importedBy: r.imported_by, importedByName: r.imported_by_name, createdAt: r.created_at.toISOString(),
});

const importQuery = (db: Db) => db('address_imports as i').leftJoin('users as u', 'u.id', 'i.imported_by').select('i.*', 'u.name as imported_by_name');

/** The project's address imports, newest first. */
export async function listAddressImports(db: Db, projectId: string): Promise<AddressImport[]> {
  const rows = await importQuery(db).where('i.project_id', projectId).orderBy([{ column: 'i.created_at', order: 'desc' }, { column: 'i.id', order: 'desc' }]);
  return (rows as ImportRow[]).map(toDto);
}

export async function getAddressImport(db: Db, id: string): Promise<(AddressImport & { storageKey: string }) | undefined> {
  const row = (await importQuery(db).where('i.id', id).first()) as ImportRow | undefined;
  return row && { ...toDto(row), storageKey: row.storage_key };
}

export async function insertAddressImport(
  trx: Knex.Transaction,
  v: Omit<AddressImport, 'importedByName' | 'createdAt'> & { storageKey: string },
): Promise<void> {
  await trx('address_imports').insert({
    id: v.id, project_id: v.projectId, file_name: v.fileName, sha256: v.sha256, size_bytes: v.sizeBytes, storage_key: v.storageKey, format: v.format,
    crs: v.crs, mapping: JSON.stringify(v.mapping), mapping_guessed: v.mappingGuessed, partial: v.partial, counts: JSON.stringify(v.counts),
    warnings: JSON.stringify(v.warnings), imported_by: v.importedBy,
  });
}

/** One import at a time per project: the register is read and written under this lock. */
export async function lockAddressRegister(trx: Knex.Transaction, projectId: string): Promise<void> {
  await trx.raw("SELECT pg_advisory_xact_lock(hashtext('address_register:' || ?))", [projectId]);
}

export type StoredAddress = RegisterAddress & { id: string };

/** Every address of the project, removed ones too, by key. */
export async function registerByKey(db: Db, projectId: string): Promise<Map<string, StoredAddress>> {
  const rows = await db('addresses')
    .where({ project_id: projectId })
    .select('id', 'key', 'street', 'number', 'postcode', 'locality', 'units', 'building_type', 'design_route_ref', 'design_side', 'connected', 'connected_source', 'removed_in_import', db.raw('ST_X(geom) as lon, ST_Y(geom) as lat'));
  return new Map(
    rows.map((r) => [
      r.key,
      {
        id: r.id, key: r.key, street: r.street, number: r.number, postcode: r.postcode, locality: r.locality, units: r.units, buildingType: r.building_type,
        lon: r.lon, lat: r.lat, designRouteRef: r.design_route_ref, designSide: r.design_side, connected: r.connected, connectedSource: r.connected_source,
        removed: r.removed_in_import !== null,
      },
    ]),
  );
}

/** The street row for a name and locality (matched by the normalised name), made when new. */
export async function upsertStreet(trx: Knex.Transaction, projectId: string, name: string, nameNorm: string, locality: string): Promise<string> {
  const [row] = await trx('address_streets')
    .insert({ project_id: projectId, name, name_norm: nameNorm, locality })
    .onConflict(['project_id', 'name_norm', 'locality'])
    .merge({ name: trx.raw('address_streets.name') })
    .returning('id');
  return row.id;
}

/** Columns of an address as the import writes them (snake case, geom as lon/lat). */
export interface AddressColumns {
  street_id?: string | null;
  street?: string;
  number?: string;
  number_base?: number | null;
  number_suffix?: string;
  postcode?: string;
  locality?: string;
  units?: number;
  building_type?: string;
  lon?: number;
  lat?: number;
  design_route_ref?: string | null;
  design_side?: 'route' | 'across' | null;
  connected?: boolean;
  connected_on?: null;
  connected_source?: 'import' | null;
  removed_in_import?: string | null;
  created_in_import?: string;
  updated_in_import?: string;
}

function toRow(trx: Knex.Transaction, c: AddressColumns): Record<string, unknown> {
  const { lon, lat, ...rest } = c;
  const row: Record<string, unknown> = { ...rest };
  if (lon !== undefined && lat !== undefined) row.geom = trx.raw('ST_SetSRID(ST_MakePoint(?, ?), 4326)', [lon, lat]);
  return row;
}

export async function insertAddress(trx: Knex.Transaction, projectId: string, key: string, c: AddressColumns): Promise<string> {
  const [row] = await trx('addresses').insert({ project_id: projectId, key, ...toRow(trx, c) }).returning('id');
  return row.id;
}

export async function updateAddress(trx: Knex.Transaction, id: string, c: AddressColumns): Promise<void> {
  await trx('addresses').where({ id }).update({ ...toRow(trx, c), updated_at: trx.fn.now() });
}

export interface HistoryRow {
  addressId: string;
  change: 'added' | 'changed' | 'removed' | 'restored';
  before: Record<string, unknown> | null;
  after: Record<string, unknown> | null;
}

export async function insertAddressHistory(trx: Knex.Transaction, projectId: string, importId: string, changedBy: string, rows: HistoryRow[]): Promise<void> {
  for (let i = 0; i < rows.length; i += 1000) {
    await trx('address_history').insert(
      rows.slice(i, i + 1000).map((h) => ({
        address_id: h.addressId, project_id: projectId, import_id: importId, change: h.change, changed_by: changedBy,
        before: h.before === null ? null : JSON.stringify(h.before), after: h.after === null ? null : JSON.stringify(h.after),
      })),
    );
  }
}
