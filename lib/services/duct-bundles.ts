import type { Knex } from 'knex';
import { z } from 'zod';
import { writeAudit } from '@/db/audit';
import { colourSequenceOfProject, listDuctSizes, type ColourSequence, type DuctSize } from '@/db/catalogues';
import {
  deleteDuctBundle,
  deleteDuctJoint,
  deletePlannedBundles,
  getDuctBundle,
  getDuctJoint,
  insertDuctBundle,
  insertDuctJoint,
  listDuctBundles,
  listDuctJoints,
  updateDuctBundle,
  type DuctBundle,
  type DuctBundleValues,
  type DuctJoint,
  type DuctValues,
} from '@/db/duct-bundles';
import { listPlannedRoutes } from '@/db/planned';
import type { Project } from '@/db/projects';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { can } from '@/lib/auth/roles';
import { continuityBreaks, countConnectors, installedAgainstPlanned, type AgainstPlan, type ConnectorCount, type ContinuityBreak } from '@/lib/records/duct-continuity';
import { ductColour, maxColourPosition } from '@/lib/records/duct-colours';
import { parseDuctSpec } from '@/lib/records/duct-spec';
import type { DuctBundleInput, DuctJointInput } from '@/lib/records/duct-schemas';
import { resolvePointAnchor, resolveStretchAnchor } from './record-anchors';

/**
 * Duct bundles, their joints, and continuity. Installed bundles are recorded by the contractor's surveyors
 * and engineers, one per stretch of a route (stretches of one route do not overlap); planned bundles are
 * derived from the plan's `ducts` attribute, one per route over its whole length (`refreshPlannedBundles`),
 * and are not edited by hand: the plan is.
 */

/**
 * The rule the routes apply with `side: 'contractor'`, kept here too so that a caller other than a route
 * (a seed, a test) cannot record what the contractor built on their behalf.
 */
function assertRecordWriter(actor: Principal, project: Project): void {
  if (!can(actor.role, 'record.write')) throw new AppError('forbidden', `Your role (${actor.role}) may not do this.`);
  if (actor.organisationId !== project.contractorOrgId) {
    throw new AppError('forbidden', `Only the contractor's people (${project.contractorOrgName}) record what was built; the network owner's people read it.`);
  }
}

const invalid = (path: string, message: string) => new AppError('invalid', message, [{ path, message }]);
const m1 = (m: number) => `${m.toFixed(1)} m`;

async function projectSequence(db: Knex, project: Project): Promise<ColourSequence | undefined> {
  return project.records.colourSequenceId ? colourSequenceOfProject(db, project.id, project.records.colourSequenceId) : undefined;
}

/** The ducts as stored: sizes from the catalogue (or custom), colours resolved in the project's sequence. */
async function resolveDucts(db: Knex, project: Project, input: DuctBundleInput, keep: Set<string>): Promise<{ ducts: DuctValues[]; sequence: ColourSequence }> {
  const sequence = await projectSequence(db, project);
  if (!sequence) throw invalid('ducts', "The project has no colour sequence: an admin picks one in the project's settings first.");
  const sizes = new Map<string, DuctSize>((await listDuctSizes(db, project.id)).map((s) => [s.id, s]));
  const ducts = input.ducts.map((d, i): DuctValues => {
    let outerMm: number;
    let innerMm: number;
    if (d.ductSizeId) {
      const size = sizes.get(d.ductSizeId);
      if (!size) throw invalid(`ducts.${i}.ductSizeId`, `Duct ${i + 1}: that size is not in this project's catalogue.`);
      if (size.retired && !keep.has(size.id)) throw invalid(`ducts.${i}.ductSizeId`, `Duct ${i + 1}: the size ${size.outerMm}/${size.innerMm} mm is retired from the catalogue; pick another.`);
      outerMm = size.outerMm;
      innerMm = size.innerMm;
    } else {
      outerMm = d.outerMm!;
      innerMm = d.innerMm!;
    }
    const colour = ductColour(sequence, d.colourPosition);
    if (!colour) throw invalid(`ducts.${i}.colourPosition`, `Duct ${i + 1}: the sequence ${sequence.name} names colours 1–${maxColourPosition(sequence)}.`);
    return { position: i + 1, ductSizeId: d.ductSizeId ?? null, outerMm, innerMm, colourPosition: colour.position, colourName: colour.name, colourHex: colour.hex, colourMarking: colour.marking, purpose: d.purpose };
  });
  return { ducts, sequence };
}

/** Installed stretches of one route may meet but not overlap: one bundle per stretch of trench. */
async function assertNoOverlap(db: Knex, projectId: string, input: DuctBundleInput, exceptId?: string): Promise<void> {
  const others = (await listDuctBundles(db, projectId, { routeId: input.routeId, kind: 'installed' })).filter((b) => b.id !== exceptId);
  const hit = others.find((b) => b.fromChainageM < input.toChainageM && input.fromChainageM < b.toChainageM);
  if (hit) {
    throw new AppError('conflict', `Route ${hit.routeRef} already has an installed bundle from ${m1(hit.fromChainageM)} to ${m1(hit.toChainageM)}: edit that one, or record the stretch beside it.`, [
      { path: 'fromChainageM', message: `Overlaps the bundle from ${m1(hit.fromChainageM)} to ${m1(hit.toChainageM)}.` },
    ]);
  }
}

const auditOf = (b: DuctBundle) => ({
  routeRef: b.routeRef,
  fromChainageM: b.fromChainageM,
  toChainageM: b.toChainageM,
  kind: b.kind,
  ducts: b.summary,
  colours: b.ducts.map((d) => d.colourLabel ?? '—').join(', '),
  tracerWire: b.tracerWire,
  warningTape: b.warningTape,
  protectiveFill: b.protectiveFill,
  note: b.note,
});

async function valuesOf(db: Knex, project: Project, input: DuctBundleInput, keep: Set<string>): Promise<DuctBundleValues> {
  const { ducts, sequence } = await resolveDucts(db, project, input, keep);
  return {
    routeId: input.routeId,
    fromChainageM: input.fromChainageM,
    toChainageM: input.toChainageM,
    kind: 'installed',
    tracerWire: input.tracerWire,
    warningTape: input.warningTape,
    protectiveFill: input.protectiveFill,
    note: input.note ?? '',
    plannedSpec: null,
    colourSequenceId: sequence.id,
    ducts,
  };
}

/** Records an installed bundle on a stretch of a route. */
export async function createDuctBundle(db: Knex, actor: Principal, project: Project, input: DuctBundleInput): Promise<DuctBundle> {
  assertRecordWriter(actor, project);
  return db.transaction(async (trx) => {
    await resolveStretchAnchor(trx, project.id, input);
    await assertNoOverlap(trx, project.id, input);
    const id = await insertDuctBundle(trx, project.id, actor.id, await valuesOf(trx, project, input, new Set()));
    const b = (await getDuctBundle(trx, id))!;
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'duct_bundle', objectId: id, action: 'create', after: auditOf(b) });
    return b;
  });
}

function assertInstalled(b: DuctBundle, what: string): void {
  if (b.kind === 'planned') throw new AppError('conflict', `A planned bundle comes from the plan's ducts attribute (${b.plannedSpec ?? '—'}); it is not ${what} by hand: import a revised plan instead.`);
}

/** Replaces an installed bundle's stretch, ducts and flags. */
export async function updateDuctBundleRecord(db: Knex, actor: Principal, project: Project, bundleId: string, input: DuctBundleInput): Promise<DuctBundle> {
  assertRecordWriter(actor, project);
  return db.transaction(async (trx) => {
    const before = await getDuctBundle(trx, bundleId);
    if (!before || before.projectId !== project.id) throw new AppError('not_found', 'No such duct bundle in this project.');
    assertInstalled(before, 'edited');
    await resolveStretchAnchor(trx, project.id, input, before.routeRemoved && input.routeId === before.routeId);
    await assertNoOverlap(trx, project.id, input, bundleId);
    const keep = new Set(before.ducts.map((d) => d.ductSizeId).filter((x): x is string => x !== null));
    await updateDuctBundle(trx, bundleId, actor.id, await valuesOf(trx, project, input, keep));
    const after = (await getDuctBundle(trx, bundleId))!;
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'duct_bundle', objectId: bundleId, action: 'update', before: auditOf(before), after: auditOf(after) });
    return after;
  });
}

export async function deleteDuctBundleRecord(db: Knex, actor: Principal, project: Project, bundleId: string): Promise<void> {
  assertRecordWriter(actor, project);
  await db.transaction(async (trx) => {
    const before = await getDuctBundle(trx, bundleId);
    if (!before || before.projectId !== project.id) throw new AppError('not_found', 'No such duct bundle in this project.');
    assertInstalled(before, 'deleted');
    await deleteDuctBundle(trx, bundleId);
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'duct_bundle', objectId: bundleId, action: 'delete', before: auditOf(before) });
  });
}

/** Records a joint or connector at a point of a route. */
export async function createDuctJoint(db: Knex, actor: Principal, project: Project, input: DuctJointInput): Promise<DuctJoint> {
  assertRecordWriter(actor, project);
  return db.transaction(async (trx) => {
    const anchor = await resolvePointAnchor(trx, project.id, input);
    const positions = [...new Set(input.ductPositions)].sort((a, b) => a - b);
    const id = await insertDuctJoint(trx, project.id, actor.id, { anchor, kind: input.kind, ductPositions: positions, note: input.note ?? '' });
    const j = (await getDuctJoint(trx, id))!;
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'duct_joint', objectId: id, action: 'create', after: { routeRef: j.routeRef, chainageM: Number(j.chainageM.toFixed(2)), kind: j.kind, ductPositions: positions, note: j.note } });
    return j;
  });
}

export async function deleteDuctJointRecord(db: Knex, actor: Principal, project: Project, jointId: string): Promise<void> {
  assertRecordWriter(actor, project);
  await db.transaction(async (trx) => {
    const j = await getDuctJoint(trx, jointId);
    if (!j || j.projectId !== project.id) throw new AppError('not_found', 'No such joint in this project.');
    await deleteDuctJoint(trx, jointId);
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'duct_joint', objectId: jointId, action: 'delete', before: { routeRef: j.routeRef, chainageM: Number(j.chainageM.toFixed(2)), kind: j.kind, ductPositions: j.ductPositions, note: j.note } });
  });
}

/** The planned bundle of one route from its ducts text, colours 1…n in the sequence's order; undefined when the text says nothing usable. */
export function plannedBundleValues(route: { id: string; ducts: string | null; lengthM: number }, sizes: DuctSize[], sequence: ColourSequence | undefined): DuctBundleValues | undefined {
  const spec = parseDuctSpec(route.ducts);
  if (!spec.ok || route.lengthM <= 0) return undefined;
  const live = sizes.filter((s) => !s.retired);
  const ducts: DuctValues[] = [];
  for (const g of spec.groups) {
    // a plan that gives the outer diameter only takes the catalogue's common size of that outer, if one
    const size = g.innerMm === null ? (live.find((s) => s.outerMm === g.outerMm && s.common) ?? live.find((s) => s.outerMm === g.outerMm)) : live.find((s) => s.outerMm === g.outerMm && s.innerMm === g.innerMm);
    for (let k = 0; k < g.count; k++) {
      const position = ducts.length + 1;
      const colour = sequence ? ductColour(sequence, position) : null;
      ducts.push({
        position,
        ductSizeId: size?.id ?? null,
        outerMm: g.outerMm,
        innerMm: g.innerMm ?? size?.innerMm ?? null,
        colourPosition: colour?.position ?? null,
        colourName: colour?.name ?? null,
        colourHex: colour?.hex ?? null,
        colourMarking: colour?.marking ?? null,
        purpose: null,
      });
    }
  }
  return { routeId: route.id, fromChainageM: 0, toChainageM: route.lengthM, kind: 'planned', tracerWire: null, warningTape: null, protectiveFill: null, note: '', plannedSpec: route.ducts, colourSequenceId: sequence?.id ?? null, ducts };
}

/**
 * Derives the planned bundles again from the current plan: one per current route whose ducts attribute
 * reads (see parseDuctSpec), over its whole length. A route whose text and length are unchanged keeps its
 * bundle; routes removed from the plan, or without a readable ducts text, lose theirs. Runs in the
 * caller's transaction when given one (e.g. a plan import) and writes one audit entry when anything changed.
 */
export async function refreshPlannedBundles(db: Knex | Knex.Transaction, actor: Principal, project: Project): Promise<{ created: number; removed: number; kept: number; unreadable: { ref: string; message: string }[] }> {
  const work = async (trx: Knex.Transaction) => {
    const routes = await listPlannedRoutes(trx, project.id, true);
    const existing = await listDuctBundles(trx, project.id, { kind: 'planned' });
    const sizes = await listDuctSizes(trx, project.id);
    const sequence = await projectSequence(trx, project);
    let created = 0;
    let removed = 0;
    let kept = 0;
    const unreadable: { ref: string; message: string }[] = [];
    for (const r of routes) {
      const mine = existing.filter((b) => b.routeId === r.id);
      const current = r.removedInVersion === null;
      const spec = parseDuctSpec(r.ducts);
      if (current && r.ducts && !spec.ok) unreadable.push({ ref: r.ref, message: spec.message });
      const values = current ? plannedBundleValues(r, sizes, sequence) : undefined;
      if (values && mine.length === 1 && mine[0].plannedSpec === r.ducts && Math.abs(mine[0].toChainageM - r.lengthM) < 0.01 && mine[0].fromChainageM === 0) {
        kept++;
        continue;
      }
      removed += await deletePlannedBundles(trx, project.id, mine.length ? [r.id] : []);
      if (values) {
        await insertDuctBundle(trx, project.id, actor.id, values);
        created++;
      }
    }
    if (created || removed) {
      await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'duct_bundle', objectId: project.id, action: 'refresh_planned', after: { created, removed, kept } });
    }
    return { created, removed, kept, unreadable };
  };
  return 'isTransaction' in db && db.isTransaction ? work(db as Knex.Transaction) : (db as Knex).transaction(work);
}

/** The refresh as a user's request: the contractor's people who may write records. */
export async function refreshPlannedBundlesFor(db: Knex, actor: Principal, project: Project) {
  assertRecordWriter(actor, project);
  return refreshPlannedBundles(db, actor, project);
}

export interface RouteContinuity {
  routeId: string;
  routeRef: string;
  routeRemoved: boolean;
  breaks: ContinuityBreak[];
  connectors: ConnectorCount;
  /** each installed stretch against the plan */
  stretches: ({ bundleId: string; fromChainageM: number; toChainageM: number } & AgainstPlan)[];
}

/** Per route with any bundle or joint: continuity breaks, connector counts and installed against planned. */
export async function ductContinuity(db: Knex, projectId: string): Promise<RouteContinuity[]> {
  const all = await listDuctBundles(db, projectId);
  const joints = await listDuctJoints(db, projectId);
  const routes = new Map<string, { ref: string; removed: boolean }>();
  for (const x of [...all, ...joints]) routes.set(x.routeId, { ref: x.routeRef, removed: x.routeRemoved });
  return [...routes.entries()]
    .sort((a, b) => a[1].ref.localeCompare(b[1].ref))
    .map(([routeId, r]) => {
      const installed = all.filter((b) => b.routeId === routeId && b.kind === 'installed');
      const planned = all.filter((b) => b.routeId === routeId && b.kind === 'planned');
      const js = joints.filter((j) => j.routeId === routeId).map((j) => ({ id: j.id, chainageM: j.chainageM, kind: j.kind, positions: j.ductPositions }));
      return {
        routeId,
        routeRef: r.ref,
        routeRemoved: r.removed,
        breaks: continuityBreaks(installed, js),
        connectors: countConnectors(js),
        stretches: installed.map((b) => ({ bundleId: b.id, fromChainageM: b.fromChainageM, toChainageM: b.toChainageM, ...installedAgainstPlanned(b, planned) })),
      };
    });
}
