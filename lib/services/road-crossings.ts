import type { Knex } from 'knex';
import { writeAudit } from '@/db/audit';
import type { Project } from '@/db/projects';
import { getAnchorRoute } from '@/db/record-anchors';
import {
  deleteRoadCrossing, getRoadCrossing, getRoadCrossingByRoute, insertRoadCrossing, updateRoadCrossing,
  type RoadCrossing, type RoadCrossingValues,
} from '@/db/road-crossings';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { can } from '@/lib/auth/roles';
import type { RoadCrossingInput, RoadCrossingPatch } from '@/lib/records/road-crossing-schema';
import { requestHouseholds } from './households';

/**
 * The rule the routes apply with `side: 'contractor'`, kept here too so that no other caller (a seed, a
 * script) records what the contractor built on someone else's behalf.
 */
export function assertContractorWriter(actor: Principal, project: Project): void {
  if (!can(actor.role, 'record.write')) throw new AppError('forbidden', `Your role (${actor.role}) may not do this.`);
  if (actor.organisationId !== project.contractorOrgId) {
    throw new AppError('forbidden', `Only the contractor's people (${project.contractorOrgName}) record what was built; the network owner's people read it.`);
  }
}

/** What the audit log keeps of a crossing: its figures, not its joins. */
const audited = (c: RoadCrossing) => ({
  route: c.routeRef, fromChainageM: c.fromChainageM, toChainageM: c.toChainageM, built: c.built, builtOn: c.builtOn, lengthM: c.lengthM,
  sawnBeforeMain: c.sawnBeforeMain, ductCount: c.ductCount, ductSize: c.ductSize, addressRef: c.addressRef, note: c.note,
});

async function checkDuctSize(db: Knex | Knex.Transaction, projectId: string, id: string | null): Promise<void> {
  if (!id) return;
  const row = await db('duct_sizes').where({ id, project_id: projectId }).first('id');
  if (!row) throw new AppError('invalid', 'That duct size is not in this project\'s catalogue.', [{ path: 'ductSizeId', message: 'Pick a duct size of this project\'s catalogue.' }]);
}

function checkStretch(v: RoadCrossingValues, route: { ref: string; lengthM: number }): void {
  if (v.toChainageM <= v.fromChainageM) throw new AppError('invalid', 'The stretch must end after it starts.', [{ path: 'toChainageM', message: 'The stretch must end after it starts (to chainage above from chainage).' }]);
  if (v.toChainageM > route.lengthM + 0.5) {
    throw new AppError('invalid', `Crossing ${route.ref} is ${route.lengthM.toFixed(1)} m long: the stretch cannot end at ${v.toChainageM} m.`, [{ path: 'toChainageM', message: `At most ${route.lengthM.toFixed(1)} m on crossing ${route.ref}.` }]);
  }
  if (!v.built && v.builtOn) throw new AppError('invalid', 'A crossing not built has no date built.', [{ path: 'builtOn', message: 'A crossing not built has no date built: tick "built" or clear the date.' }]);
}

/**
 * Records a road crossing on one of the plan's crossing routes (one record a route; the stretch defaults
 * to the whole route). Refuses a street route, a route removed from the plan, a second record for the same
 * crossing (409: edit the first) and a duct size from outside the project's catalogue.
 */
export async function createRoadCrossing(db: Knex, actor: Principal, project: Project, input: RoadCrossingInput): Promise<RoadCrossing> {
  assertContractorWriter(actor, project);
  const route = await getAnchorRoute(db, project.id, input.routeId);
  if (!route) throw new AppError('invalid', 'That route is not in this project.', [{ path: 'routeId', message: 'Pick a crossing route of this project.' }]);
  if (route.kind !== 'crossing') throw new AppError('invalid', `Route ${route.ref} is a street route, not a road crossing: pick one of the plan's crossings.`, [{ path: 'routeId', message: 'Pick a crossing route.' }]);
  if (route.removed) throw new AppError('invalid', `Crossing ${route.ref} was removed by a plan revision: no new record is added to it.`, [{ path: 'routeId', message: 'This crossing was removed from the plan.' }]);
  const v: RoadCrossingValues = {
    fromChainageM: input.fromChainageM ?? 0,
    toChainageM: input.toChainageM ?? route.lengthM,
    built: input.built ?? false,
    builtOn: input.builtOn ?? null,
    lengthM: input.lengthM ?? null,
    sawnBeforeMain: input.sawnBeforeMain ?? null,
    ductCount: input.ductCount ?? null,
    ductSizeId: input.ductSizeId ?? null,
    addressRef: input.addressRef || null,
    note: input.note ?? '',
  };
  checkStretch(v, route);
  await checkDuctSize(db, project.id, v.ductSizeId);
  const id = await db.transaction(async (trx) => {
    const existing = await getRoadCrossingByRoute(trx, route.id);
    if (existing) throw new AppError('conflict', `Crossing ${route.ref} already has a record: edit it instead.`, { crossingId: existing.id });
    let newId: string;
    try {
      newId = await insertRoadCrossing(trx, project.id, route.id, v, actor.id);
    } catch (err) {
      // two people recording the same crossing at once: the unique index decides
      if ((err as { constraint?: string }).constraint === 'road_crossings_route_unique') throw new AppError('conflict', `Crossing ${route.ref} already has a record: edit it instead.`);
      throw err;
    }
    const created = (await getRoadCrossing(trx, newId))!;
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'road_crossing', objectId: newId, action: 'create', after: audited(created) });
    return newId;
  });
  // a crossing carries the service across the street: households passed follow
  await requestHouseholds(db, project.id, actor.id);
  return (await getRoadCrossing(db, id))!;
}

/** Changes a crossing's record (the route stays); the audit entry keeps what it was. */
export async function editRoadCrossing(db: Knex, actor: Principal, project: Project, id: string, patch: RoadCrossingPatch): Promise<RoadCrossing> {
  assertContractorWriter(actor, project);
  const id2 = await db.transaction(async (trx) => {
    await trx('road_crossings').where({ id }).forUpdate().first('id');
    const before = await getRoadCrossing(trx, id);
    if (!before || before.projectId !== project.id) throw new AppError('not_found', 'No such road crossing in this project.');
    const route = (await getAnchorRoute(trx, project.id, before.routeId))!;
    const pick = <K extends keyof RoadCrossingValues>(k: K, current: RoadCrossingValues[K]): RoadCrossingValues[K] => (patch[k as keyof RoadCrossingPatch] === undefined ? current : (patch[k as keyof RoadCrossingPatch] as RoadCrossingValues[K]));
    const v: RoadCrossingValues = {
      fromChainageM: pick('fromChainageM', before.fromChainageM),
      toChainageM: pick('toChainageM', before.toChainageM),
      built: pick('built', before.built),
      // "not built" clears the date unless the change names one (which is then refused)
      builtOn: patch.built === false && patch.builtOn === undefined ? null : pick('builtOn', before.builtOn),
      lengthM: pick('lengthM', before.lengthM),
      sawnBeforeMain: pick('sawnBeforeMain', before.sawnBeforeMain),
      ductCount: pick('ductCount', before.ductCount),
      ductSizeId: pick('ductSizeId', before.ductSizeId),
      addressRef: patch.addressRef === undefined ? before.addressRef : patch.addressRef || null,
      note: pick('note', before.note),
    };
    checkStretch(v, route);
    await checkDuctSize(trx, project.id, v.ductSizeId);
    await updateRoadCrossing(trx, id, v, actor.id);
    const after = (await getRoadCrossing(trx, id))!;
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'road_crossing', objectId: id, action: 'update', before: audited(before), after: audited(after) });
    return id;
  });
  await requestHouseholds(db, project.id, actor.id);
  return (await getRoadCrossing(db, id2))!;
}

/** Removes a crossing's record (the crossing route is then "not built yet" again); its photos stay, unattached. */
export async function removeRoadCrossing(db: Knex, actor: Principal, project: Project, id: string): Promise<void> {
  assertContractorWriter(actor, project);
  await db.transaction(async (trx) => {
    const before = await getRoadCrossing(trx, id);
    if (!before || before.projectId !== project.id) throw new AppError('not_found', 'No such road crossing in this project.');
    await deleteRoadCrossing(trx, id);
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'road_crossing', objectId: id, action: 'delete', before: audited(before) });
  });
  await requestHouseholds(db, project.id, actor.id);
}
