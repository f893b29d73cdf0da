import type { Knex } from 'knex';
import type { Project } from '@/db/projects';
import { AppError } from '@/lib/api/errors';
import type { ReceivedForm } from '@/lib/api/multipart';
import type { Principal } from '@/lib/auth/principal';

export type AddressImportResult = { dryRun: true; preview: unknown } | { dryRun: false; import: unknown };

/** Imports the address register (in progress: helper A). */
export async function importAddresses(_db: Knex, _actor: Principal, _project: Project, _form: ReceivedForm): Promise<AddressImportResult> {
  throw new AppError('bad_request', 'The address import is being built.');
}
