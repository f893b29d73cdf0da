import type { Knex } from 'knex';
import { z } from 'zod';
import { getAddress, type Address } from '@/db/addresses';
import { writeAudit } from '@/db/audit';
import type { Project } from '@/db/projects';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { can } from '@/lib/auth/roles';
import { connectSchema } from '@/lib/households/connect';
import { loadCrossingRecords, loadHouseholdAddresses, loadHouseholdRoutes, loadHouseholdSections, setAddressConnected, upsertProgress, writeDerivedColumns, type DerivedColumns } from '@/db/households';
import { getProject } from '@/db/projects';
import { computePassed, householdFigures, type SectionInput } from '@/lib/households/passed';
import { ServingFinder, type Serving } from '@/lib/households/serving';
import { dayOnClock } from '@/lib/records/production';

/** addresses served between two progress reports (about a tenth of a second of work here) */
const SERVE_BATCH = 5_000;

export interface HouseholdFigures {
  addresses: number;
  households: number;
  householdsServed: number;
  addressesPassed: number;
  householdsPassed: number;
  householdsPassedApproved: number;
  addressesConnected: number;
  householdsConnected: number;
}

/**
 * Derives every address's serving route, side, foot point and passed flag from the current plan, the built
 * sections and the road crossings (lib/households/serving.ts and passed.ts), writes them in one
 * transaction, and upserts the day's progress row (the project's own calendar day of `now`). A run that
 * dies midway leaves the derived columns as the previous run left them.
 */
export async function recomputeHouseholds(
  db: Knex,
  projectId: string,
  progress: (f: number, m: string) => Promise<void>,
  now: Date = new Date(),
): Promise<HouseholdFigures> {
  const project = await getProject(db, projectId);
  if (!project) throw new Error(`No project ${projectId}`);
  await progress(0.05, 'Reading the addresses, the plan, the built sections and the road crossings');
  const figures = await db.transaction(async (trx) => {
    // one recompute of a project at a time, each reading what the one before it left: a second waits, then reads afresh
    await trx.raw('SELECT pg_advisory_xact_lock(hashtext(?))', [`households:${projectId}`]);
    const addresses = await loadHouseholdAddresses(trx, projectId);
    const routes = await loadHouseholdRoutes(trx, projectId);
    const sections = await loadHouseholdSections(trx, projectId);
    const records = await loadCrossingRecords(trx, projectId);
    await progress(0.25, `Finding the serving route of ${addresses.length} addresses among ${routes.filter((r) => r.kind === 'street' && !r.removed).length} street routes`);
    // a batch at a time, reporting between batches: a long synchronous stretch would starve the job's heartbeat
    // (a run of 200,000 addresses takes seconds) and the sweep would take the living job for dead
    const finder = new ServingFinder(routes, project.households);
    const servings: Serving[] = [];
    for (let i = 0; i < addresses.length; i += SERVE_BATCH) {
      for (const a of addresses.slice(i, i + SERVE_BATCH)) servings.push(finder.serve(a));
      if (i + SERVE_BATCH < addresses.length) await progress(0.25 + (0.3 * (i + SERVE_BATCH)) / addresses.length, `Serving routes found for ${i + SERVE_BATCH} of ${addresses.length} addresses`);
    }
    const { crossings } = finder.finish(addresses, servings);
    await progress(0.55, 'Checking what is built in front of each address');
    const passed = computePassed(addresses, servings, sections as SectionInput[], crossings, records, project.households);
    const rows: DerivedColumns[] = servings.map((s, i) => ({
      id: s.addressId, servingRouteId: s.routeId, servingBy: s.by, side: s.side, footChainageM: s.footChainageM, distanceM: s.distanceM,
      passed: passed[i].passed, passedApproved: passed[i].passedApproved, passedViaCrossingId: passed[i].viaCrossingId, notPassedReason: passed[i].notPassedReason,
    }));
    const f = householdFigures(addresses.map((a, i) => ({ units: a.units, served: servings[i].routeId !== null, passed: passed[i].passed, passedApproved: passed[i].passedApproved, connected: a.connected })));
    await progress(0.7, `Writing ${rows.length} addresses`);
    await writeDerivedColumns(trx, projectId, rows, now);
    await upsertProgress(trx, projectId, { day: dayOnClock(now, project.timeZone), ...f }, now);
    return f;
  });
  await progress(1, `${figures.addressesPassed} of ${figures.addresses} addresses passed`);
  return figures;
}

/** Queues a households recompute unless one is already waiting: changes in quick succession share one run. */
export async function requestHouseholds(db: Knex, projectId: string, requestedBy: string | null) {
  // loaded here, not at the top: the job kinds import this module, and the queue imports the kinds
  const { enqueueJob } = await import('@/lib/jobs/queue');
  const { getJob } = await import('@/db/jobs');
  const waiting = await db('jobs').where({ project_id: projectId, kind: 'households', status: 'queued' }).orderBy('created_at').first('id');
  if (waiting) return (await getJob(db, waiting.id))!;
  return enqueueJob(db, { projectId, kind: 'households', input: { requestedBy }, createdBy: requestedBy });
}

export { connectSchema };

/**
 * Records an address's drop as installed (or takes it back), by hand: the contractor's people only, with a
 * history row and an audit entry in one transaction; the figures are then worked out again (queued).
 */
export async function connectAddress(db: Knex, actor: Principal, project: Project, addressId: string, input: z.infer<typeof connectSchema>): Promise<Address> {
  if (!can(actor.role, 'address.connect')) throw new AppError('forbidden', `Your role (${actor.role}) may not do this.`);
  if (actor.organisationId !== project.contractorOrgId) {
    throw new AppError('forbidden', `Only the contractor's people (${project.contractorOrgName}) record drops as installed; the network owner's people read them.`);
  }
  await db.transaction(async (trx) => {
    const row = await trx('addresses').where({ id: addressId, project_id: project.id }).forUpdate().first('id');
    const before = row && (await getAddress(trx, addressId));
    if (!before) throw new AppError('not_found', 'No such address in this project.');
    if (before.removed) throw new AppError('conflict', `Address ${before.key} was removed from the register by a later import: it is counted nowhere.`);
    const on = input.connected ? (input.connectedOn ?? dayOnClock(new Date(), project.timeZone)) : null;
    const was = { connected: before.connected, connectedOn: before.connectedOn, connectedSource: before.connectedSource };
    await setAddressConnected(trx, addressId, project.id, input.connected, on, actor.id, was);
    await writeAudit(trx, auditActor(actor), {
      projectId: project.id, objectType: 'address', objectId: addressId, action: input.connected ? 'connect' : 'disconnect',
      before: { key: before.key, ...was }, after: { key: before.key, connected: input.connected, connectedOn: on, connectedSource: input.connected ? 'hand' : null },
    });
  });
  await requestHouseholds(db, project.id, actor.id);
  return (await getAddress(db, addressId))!;
}
