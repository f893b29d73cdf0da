import type { Db } from './client';
import { addressScore, parseAddressQuery } from '@/lib/households/address-query';

/** One candidate of the address search, with its score (0..1) and position. */
export interface AddressCandidate {
  id: string;
  projectId: string;
  key: string;
  street: string;
  number: string;
  postcode: string;
  locality: string;
  lon: number;
  lat: number;
  score: number;
}

const STREETS = 5;

/**
 * Street first, then the number: trigram similarity (`%`, pg_trgm's GIN index on `address_streets.name_norm`)
 * finds the few best streets among a project's thousands, then their addresses are taken by `street_id` and
 * number (exact number and suffix first, the same base number, then the nearest numbers). Trigram similarity
 * on the whole address string over a million rows is far slower. A postcode, when given, raises the score;
 * without one nothing is lost.
 *
 * These queries are pattern / trigram queries: they must never run as named prepared statements (a generic
 * plan turned one into a sequential scan). knex and pg only name a statement when given `name`; never pass one.
 */
export async function searchAddresses(db: Db, opts: { projectIds: string[]; q: string; limit: number }): Promise<AddressCandidate[]> {
  const q = parseAddressQuery(opts.q);
  if (opts.projectIds.length === 0 || q.street.length < 2) return [];
  const streets: { id: string; sim: number }[] = await db('address_streets')
    .whereIn('project_id', opts.projectIds)
    .whereRaw('name_norm % ?', [q.street])
    .orderByRaw('similarity(name_norm, ?) desc', [q.street])
    .limit(STREETS)
    .select('id', db.raw('similarity(name_norm, ?) as sim', [q.street]));
  if (streets.length === 0) return [];
  const sim = new Map(streets.map((s) => [s.id, Number(s.sim)]));
  const base = q.number?.base ?? null;
  const rows = await db('addresses')
    .whereIn('street_id', streets.map((s) => s.id))
    .whereNull('removed_in_import')
    .orderByRaw(base === null ? 'number_base nulls last' : 'abs(coalesce(number_base, 1000000) - ?), number_suffix = ? desc', base === null ? [] : [base, q.number!.suffix])
    .limit(opts.limit * STREETS)
    .select('id', 'project_id', 'key', 'street_id', 'street', 'number', 'number_base', 'number_suffix', 'postcode', 'locality', db.raw('ST_X(geom) as lon, ST_Y(geom) as lat'));
  return rows
    .map((r) => ({
      id: r.id, projectId: r.project_id, key: r.key, street: r.street, number: r.number, postcode: r.postcode, locality: r.locality, lon: r.lon, lat: r.lat,
      score: addressScore(sim.get(r.street_id) ?? 0, q, { numberBase: r.number_base, numberSuffix: r.number_suffix, postcode: r.postcode }),
    }))
    .sort((a, b) => b.score - a.score || a.street.localeCompare(b.street) || a.number.localeCompare(b.number))
    .slice(0, opts.limit);
}
