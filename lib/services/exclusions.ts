import type { Knex } from 'knex';
import { z } from 'zod';
import { RANGES, rangedNumber } from '@/lib/records/plausible-ranges';
import { writeAudit } from '@/db/audit';
import { getProject } from '@/db/projects';
import { deleteUploadExclusion, getUploadExclusion, insertUploadExclusion, listUploadExclusions, listUploadTraces, type UploadExclusion, type UploadFix } from '@/db/uploads';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { applyExclusions, type Exclusion } from '@/lib/matching/apply-exclusions';
import { distanceM } from '@/lib/matching/chainage';
import { formatInZone } from '@/lib/records/zoned-time';
import { requestReconciliation } from './reconcile';

// metres from the start of each trace, within the plausible range of a chainage (0–100 km)
const ALONG_TRACE = { ...RANGES.chainageM, what: 'The distance along the trace' };

export const exclusionSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('time'), from: z.iso.datetime({ offset: true, message: 'Give the start as an ISO time, e.g. 2026-11-03T09:40:00Z.' }), to: z.iso.datetime({ offset: true, message: 'Give the end as an ISO time.' }), reason: z.string().trim().min(3, 'Say why this stretch is left out.').max(500) }),
  z.object({ kind: z.literal('distance'), from: rangedNumber(ALONG_TRACE), to: rangedNumber(ALONG_TRACE), reason: z.string().trim().min(3, 'Say why this stretch is left out.').max(500) }),
]).refine((e) => (e.kind === 'time' ? Date.parse(e.from) < Date.parse(e.to) : e.from < e.to), { message: 'The range must end after it starts.', path: ['to'] });
export type ExclusionInput = z.infer<typeof exclusionSchema>;

/** A stored range as the matcher reads it: epoch seconds or metres along each trace. */
export function toMatchingExclusion(e: Pick<UploadExclusion, 'kind' | 'from' | 'to'>): Exclusion {
  return e.kind === 'time' ? { kind: 'time', fromT: Date.parse(String(e.from)) / 1000, toT: Date.parse(String(e.to)) / 1000 } : { kind: 'distance', fromM: Number(e.from), toM: Number(e.to) };
}

/** How many of the traces' fixes a set of ranges leaves out (what `applyExclusions` drops). */
export function fixesLeftOut(traces: UploadFix[][], exclusions: Exclusion[]): number {
  let n = 0;
  for (const t of traces) n += t.length - applyExclusions(t, exclusions).reduce((k, piece) => k + piece.length, 0);
  return n;
}

/** First and last fix time of the traces (epoch seconds), or null when no fix carries a time. */
export function fixTimeSpan(traces: UploadFix[][]): { firstT: number; lastT: number } | null {
  let firstT = Infinity;
  let lastT = -Infinity;
  for (const t of traces) for (const f of t) if (f.t !== null) { firstT = Math.min(firstT, f.t); lastT = Math.max(lastT, f.t); }
  return Number.isFinite(firstT) ? { firstT, lastT } : null;
}

/**
 * Keeps a time or distance range of an upload out of matching (the original keeps it), audited, then
 * reconciles. A range that holds no fix of the upload is refused (422 `empty_range`): it would change
 * nothing, and is most often a time typed on the wrong day or clock.
 */
export async function excludeFromMatching(db: Knex, actor: Principal, projectId: string, uploadId: string, input: ExclusionInput) {
  const traces = await listUploadTraces(db, uploadId);
  const leftOut = fixesLeftOut(traces, [toMatchingExclusion(input)]);
  if (leftOut === 0) {
    const project = (await getProject(db, projectId))!;
    const span = fixTimeSpan(traces);
    const at = (t: number) => formatInZone(t * 1000, project.timeZone);
    if (input.kind === 'time') {
      throw new AppError(
        'empty_range',
        span
          ? `No fix of this upload falls between ${at(Date.parse(input.from) / 1000)} and ${at(Date.parse(input.to) / 1000)} (${project.timeZone}); its fixes run from ${at(span.firstT)} to ${at(span.lastT)}.`
          : 'This upload\'s fixes carry no times: leave a stretch out by metres along the trace instead.',
      );
    }
    const longest = Math.max(0, ...traces.map((t) => t.reduce((n, f, i) => (i === 0 ? 0 : n + distanceM([t[i - 1].lon, t[i - 1].lat], [f.lon, f.lat])), 0)));
    throw new AppError('empty_range', `No fix of this upload lies between ${input.from} and ${input.to} m along its traces; the longest trace is ${longest.toFixed(1)} m long.`);
  }
  const id = await db.transaction(async (trx) => {
    const id = await insertUploadExclusion(trx, uploadId, input, actor.id);
    await writeAudit(trx, auditActor(actor), { projectId, objectType: 'upload', objectId: uploadId, action: 'exclude_range', after: { id, ...input, fixesLeftOut: leftOut } });
    return id;
  });
  const job = await requestReconciliation(db, projectId, actor.id);
  return { exclusion: { id, ...input, fixesLeftOut: leftOut }, job };
}

/** Takes a range back into matching: the row goes, the audit log keeps what it was, the project is reconciled again. */
export async function removeExclusion(db: Knex, actor: Principal, projectId: string, uploadId: string, exclusionId: number) {
  await db.transaction(async (trx) => {
    const before = await getUploadExclusion(trx, uploadId, exclusionId);
    if (!before) throw new AppError('not_found', 'This range is not among the upload\'s left-out ranges; it may have been removed already.');
    await deleteUploadExclusion(trx, uploadId, exclusionId);
    await writeAudit(trx, auditActor(actor), { projectId, objectType: 'upload', objectId: uploadId, action: 'include_range', before: { id: before.id, kind: before.kind, from: before.from, to: before.to, reason: before.reason } });
  });
  return { job: await requestReconciliation(db, projectId, actor.id) };
}

/** One fix for the trace map: position, time, metres from its trace's start, and which trace. */
export interface PickFix {
  lon: number;
  lat: number;
  t: number | null;
  alongM: number;
  trace: number;
}

/**
 * What the upload page shows of the fixes: their count, first and last time, each range's share of them,
 * and at most `max` fixes (every k-th, each trace's ends kept) to pick a stretch on the map.
 */
export async function uploadFixOverview(db: Knex, uploadId: string, max = 3000) {
  const traces = await listUploadTraces(db, uploadId);
  const total = traces.reduce((n, t) => n + t.length, 0);
  const step = Math.max(1, Math.ceil(total / max));
  const fixes: PickFix[] = [];
  traces.forEach((t, k) => {
    let along = 0;
    t.forEach((f, i) => {
      if (i > 0) along += distanceM([t[i - 1].lon, t[i - 1].lat], [f.lon, f.lat]);
      if (i % step === 0 || i === t.length - 1) fixes.push({ lon: f.lon, lat: f.lat, t: f.t, alongM: Math.round(along * 10) / 10, trace: k });
    });
  });
  const exclusions = await listUploadExclusions(db, uploadId);
  return {
    total,
    traces: traces.length,
    span: fixTimeSpan(traces),
    fixes,
    exclusions: exclusions.map((e) => ({ ...e, fixesLeftOut: fixesLeftOut(traces, [toMatchingExclusion(e)]) })),
  };
}
