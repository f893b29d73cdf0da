import { randomUUID } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import type { Knex } from 'knex';
import { z } from 'zod';
import { writeAudit } from '@/db/audit';
import { getCrsDefinition } from '@/db/crs';
import {
  getAddressImport,
  insertAddress,
  insertAddressHistory,
  insertAddressImport,
  lockAddressRegister,
  registerByKey,
  updateAddress,
  upsertStreet,
  type AddressColumns,
  type AddressImport,
  type AddressImportCounts,
  type HistoryRow,
  type StoredAddress,
} from '@/db/address-imports';
import type { Project } from '@/db/projects';
import { AppError, type ErrorCode } from '@/lib/api/errors';
import { epsgField, jsonField } from '@/lib/api/form-fields';
import type { ReceivedForm } from '@/lib/api/multipart';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { env } from '@/lib/env';
import { diffCounts, diffRegister, type AddressChange, type ComparedField, type RegisterDiff } from '@/lib/households/address-diff';
import {
  ADDRESS_FIELDS,
  applyAddressMapping,
  guessAddressMapping,
  mappingProblems,
  type AddressField,
  type AddressMapping,
  type AddressValues,
  type RowError,
} from '@/lib/households/address-mapping';
import { normaliseStreet, parseHouseNumber } from '@/lib/households/normalise';
import { positionerForFile, readAddressFile, type AddressFile, type AddressFileFormat } from '@/lib/households/read-address-file';
import { IngestError } from '@/lib/ingest/types';
import { removeOriginals, storeOriginals } from './originals';
import { requestHouseholds } from './households';

const flag = z.enum(['true', 'false', '1', '0', 'on', '']).transform((s) => s === 'true' || s === '1' || s === 'on');
const mappingSchema = z
  .object(Object.fromEntries(ADDRESS_FIELDS.map((f) => [f, z.string().trim().max(200)])) as Record<AddressField, z.ZodString>)
  .partial()
  .strict();

/** The form fields of an address import (multipart, beside the `file` part). */
export const addressImportFieldsSchema = z.object({
  crs: z.preprocess((v) => (v === '' ? undefined : v), epsgField.optional()),
  mapping: jsonField(mappingSchema, '{"key":"uprn","street":"street","number":"house_no","lon":"lon","lat":"lat"}').optional(),
  dryRun: flag.optional(),
  partial: flag.optional(),
});

// how many changes of each kind a preview lists by key (the counts are always complete)
const PREVIEW_LIST = 200;

export interface AddressImportPreview {
  format: AddressFileFormat;
  fileName: string;
  columns: string[];
  mapping: AddressMapping;
  /** the fields the mapping's guess filled (none when the mapping was sent) */
  guessed: AddressField[];
  /** 'EPSG:nnnn' of the positions, null when it could not be settled (see problems) */
  crs: string | null;
  partial: boolean;
  /** what keeps the whole file from being read with this mapping (no key column, x/y without a crs …) */
  problems: { path: string; message: string }[];
  warnings: string[];
  rowCount: number;
  /** the first 20 rows as mapped */
  rows: AddressValues[];
  /** every row that cannot be imported, with its row number and reasons */
  errors: RowError[];
  counts: AddressImportCounts;
  /** the keys of each change (the first 200 of each), the changed ones with their fields before and after */
  changes: { added: string[]; changed: AddressChange[]; restored: AddressChange[]; removed: string[] };
}

export type AddressImportResult =
  | { dryRun: true; preview: AddressImportPreview }
  | { dryRun: false; import: AddressImport; counts: AddressImportCounts };

interface Prepared {
  preview: AddressImportPreview;
  values: AddressValues[];
  bytes: Buffer;
}

function appError(e: IngestError): AppError {
  return new AppError(e.code as ErrorCode, e.message, e.details);
}

async function prepare(db: Knex, project: Project, form: ReceivedForm, fields: z.infer<typeof addressImportFieldsSchema>): Promise<Prepared> {
  const parts = form.files.filter((f) => f.field === 'file');
  if (parts.length === 0) throw new AppError('bad_request', 'Attach the address register in a multipart part named "file".');
  if (parts.length > 1) throw new AppError('bad_request', `Send one file (${parts.length} were sent); zip the parts of a shapefile together.`);
  const part = parts[0];
  const bytes = await readFile(part.tmpPath);
  const e = env();
  const opts = { crs: fields.crs, resolveCrs: (srid: number) => getCrsDefinition(db, srid), limits: { maxInflatedBytes: e.ZIP_MAX_INFLATED_BYTES, maxZipEntries: e.ZIP_MAX_ENTRIES } };
  let file: AddressFile;
  try {
    file = await readAddressFile({ name: part.fileName, bytes }, opts);
  } catch (err) {
    throw err instanceof IngestError ? appError(err) : err;
  }
  const geometry = file.geometryCrs !== undefined;
  const given: AddressMapping = Object.fromEntries(Object.entries(fields.mapping ?? {}).filter(([, v]) => v)) as AddressMapping;
  const { mapping, guessed } = fields.mapping ? { mapping: given, guessed: [] as AddressField[] } : guessAddressMapping(file.columns, {}, geometry);
  if (geometry) for (const f of ['lon', 'lat', 'x', 'y'] as const) delete mapping[f];
  const problems = mappingProblems(mapping, file.columns, geometry);
  const warnings = [...file.warnings];
  const partial = fields.partial ?? false;
  const preview: AddressImportPreview = {
    format: file.format, fileName: part.fileName, columns: file.columns, mapping, guessed, crs: null, partial, problems, warnings,
    rowCount: file.rows.length, rows: [], errors: [], counts: { rows: file.rows.length, added: 0, changed: 0, removed: 0, restored: 0, unchanged: 0 },
    changes: { added: [], changed: [], restored: [], removed: [] },
  };
  if (problems.length) return { preview, values: [], bytes };
  let positioner;
  try {
    const p = await positionerForFile(file, mapping, opts);
    positioner = p.positioner;
    preview.crs = p.crs;
    if (p.warning) warnings.push(p.warning);
  } catch (err) {
    if (!(err instanceof IngestError)) throw err;
    preview.problems.push({ path: err.code === 'crs_required' ? 'crs' : 'file', message: err.message });
    return { preview, values: [], bytes };
  }
  const { values, errors } = applyAddressMapping(file.rows, mapping, positioner);
  preview.rows = values.slice(0, 20);
  preview.errors = errors;
  const diff = diffRegister(await registerByKey(db, project.id), values, partial);
  preview.counts = diffCounts(diff, file.rows.length);
  const short = ({ values: _v, ...c }: AddressChange & { values: AddressValues }) => c;
  preview.changes = {
    added: diff.added.slice(0, PREVIEW_LIST).map((v) => v.key),
    changed: diff.changed.slice(0, PREVIEW_LIST).map(short),
    restored: diff.restored.slice(0, PREVIEW_LIST).map(short),
    removed: diff.removed.slice(0, PREVIEW_LIST),
  };
  return { preview, values, bytes };
}

/**
 * Imports the project's address register from a CSV, GeoJSON points or a zipped shapefile of points.
 * `dryRun` returns the preview and stores nothing. Otherwise any row error refuses the whole file (422, every
 * row error in `details`); else one transaction keeps the original file, the import, the streets, the
 * addresses by key with their history and one audit entry, and the households are recomputed after it.
 * The file is the whole register: a key it lacks is marked removed; `partial` only adds and updates.
 */
export async function importAddresses(db: Knex, actor: Principal, project: Project, form: ReceivedForm): Promise<AddressImportResult> {
  const fields = addressImportFieldsSchema.parse(form.fields);
  const { preview, values, bytes } = await prepare(db, project, form, fields);
  if (fields.dryRun) return { dryRun: true, preview };

  if (preview.problems.length) {
    const p = preview.problems[0];
    const code: ErrorCode = p.path === 'crs' ? 'crs_required' : 'invalid';
    throw new AppError(code, preview.problems.map((x) => x.message).join(' '), { problems: preview.problems, columns: preview.columns, mapping: preview.mapping });
  }
  if (preview.errors.length) {
    const n = preview.errors.length;
    const first = preview.errors.slice(0, 3).map((r) => `row ${r.row}: ${r.message}`).join('; ');
    throw new AppError('invalid', `${n} row${n === 1 ? '' : 's'} of the file cannot be imported, so nothing was stored: ${first}${n > 3 ? ` (and ${n - 3} more)` : ''}.`, preview.errors);
  }
  if (values.length === 0) throw new AppError('empty_file', 'The file holds no addresses.');

  const part = form.files.find((f) => f.field === 'file')!;
  const importId = randomUUID();
  const [stored] = await storeOriginals(`addresses/${project.id}/${importId}`, [part], [bytes]);
  let counts: AddressImportCounts;
  try {
    counts = await db.transaction(async (trx) => {
      await lockAddressRegister(trx, project.id);
      // read again under the lock: the preview's reading may be stale
      const register = await registerByKey(trx, project.id);
      const diff = diffRegister(register, values, preview.partial);
      const c = diffCounts(diff, values.length);
      await insertAddressImport(trx, {
        id: importId, projectId: project.id, fileName: part.fileName.slice(0, 500), sha256: part.sha256, sizeBytes: part.size, storageKey: stored.storageKey,
        format: preview.format, crs: preview.crs!, mapping: preview.mapping as Record<string, string>, mappingGuessed: preview.guessed.length > 0,
        partial: preview.partial, counts: c, warnings: preview.warnings, importedBy: actor.id,
      });
      await writeRegister(trx, project.id, importId, actor.id, register, diff);
      await writeAudit(trx, auditActor(actor), {
        projectId: project.id, objectType: 'address_import', objectId: importId, action: 'import',
        after: { fileName: part.fileName, format: preview.format, crs: preview.crs, partial: preview.partial, mapping: preview.mapping, ...c },
      });
      return c;
    });
  } catch (err) {
    await removeOriginals([stored]);
    throw err;
  }
  await requestHouseholds(db, project.id, actor.id);
  return { dryRun: false, import: (await getAddressImport(db, importId))!, counts };
}

async function writeRegister(trx: Knex.Transaction, projectId: string, importId: string, userId: string, register: Map<string, StoredAddress>, diff: RegisterDiff) {
  const streets = new Map<string, string>();
  const streetId = async (name: string, locality: string): Promise<string | null> => {
    const norm = normaliseStreet(name);
    if (norm === '') return null;
    const k = `${norm}\u0000${locality}`;
    if (!streets.has(k)) streets.set(k, await upsertStreet(trx, projectId, name.trim(), norm, locality));
    return streets.get(k)!;
  };
  const history: HistoryRow[] = [];

  for (const v of diff.added) {
    const cols = await columnsFor(v, null, streetId);
    const id = await insertAddress(trx, projectId, v.key, { ...cols, created_in_import: importId, updated_in_import: importId });
    history.push({ addressId: id, change: 'added', before: null, after: null });
  }
  for (const change of [...diff.changed, ...diff.restored]) {
    const a = register.get(change.key)!;
    const restoring = a.removed;
    const cols = await columnsFor(change.values, { a, fields: change.fields }, streetId);
    await updateAddress(trx, a.id, { ...cols, ...(restoring ? { removed_in_import: null } : {}), updated_in_import: importId });
    const has = change.fields.length > 0;
    history.push({ addressId: a.id, change: restoring ? 'restored' : 'changed', before: has ? change.before : null, after: has ? change.after : null });
  }
  for (const key of diff.removed) {
    const a = register.get(key)!;
    await updateAddress(trx, a.id, { removed_in_import: importId, updated_in_import: importId });
    history.push({ addressId: a.id, change: 'removed', before: null, after: null });
  }
  await insertAddressHistory(trx, projectId, importId, userId, history);
}

/** The columns to write: every mapped field for a new address; the changed fields for one that exists. */
async function columnsFor(
  v: AddressValues,
  existing: { a: StoredAddress; fields: ComparedField[] } | null,
  streetId: (name: string, locality: string) => Promise<string | null>,
): Promise<AddressColumns> {
  const wants = (f: ComparedField) => existing === null || existing.fields.includes(f);
  const c: AddressColumns = {};
  if (wants('position')) Object.assign(c, { lon: v.lon, lat: v.lat });
  if (v.number !== undefined && wants('number')) {
    const n = parseHouseNumber(v.number);
    Object.assign(c, { number: v.number, number_base: n.base, number_suffix: n.suffix });
  }
  if (v.postcode !== undefined && wants('postcode')) c.postcode = v.postcode;
  if (v.units !== undefined && wants('units')) c.units = v.units;
  if (v.buildingType !== undefined && wants('buildingType')) c.building_type = v.buildingType;
  if (v.designRouteRef !== undefined && wants('designRouteRef')) c.design_route_ref = v.designRouteRef;
  if (v.designSide !== undefined && wants('designSide')) c.design_side = v.designSide;
  if (v.connected !== undefined && wants('connected')) Object.assign(c, v.connected ? { connected: true, connected_source: 'import' } : { connected: false, connected_source: null, connected_on: null });
  if (v.locality !== undefined && wants('locality')) c.locality = v.locality;
  // the street row follows the street's name and the locality
  if ((v.street !== undefined && wants('street')) || (v.locality !== undefined && wants('locality'))) {
    const street = v.street ?? existing?.a.street ?? '';
    const locality = v.locality ?? existing?.a.locality ?? '';
    if (v.street !== undefined) c.street = street;
    c.street_id = await streetId(street, locality);
  }
  return c;
}
