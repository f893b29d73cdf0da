import type { Knex } from 'knex';
import type { z } from 'zod';
import { writeAudit } from '@/db/audit';
import { listBackfillMaterials, listColourSequences, listDuctSizes, listUtilityKinds } from '@/db/catalogues';
import type { Project } from '@/db/projects';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { can } from '@/lib/auth/roles';
import type { backfillMaterialPatchSchema, backfillMaterialSchema, colourSequenceSchema, ductSizePatchSchema, ductSizeSchema, utilityKindPatchSchema, utilityKindSchema } from '@/lib/records/catalogue-schemas';

/**
 * Editing a project's catalogues (duct sizes, colour sequences, utility kinds, backfill materials). Who:
 * the contractor's admins and engineers (action `catalogue.manage`, routes with `side: 'contractor'`): the
 * catalogues are the lists the contractor's forms offer, of what the crews lay and find, so they are kept by
 * the people who record with them; the network owner's people read them with the records. Nothing is
 * deleted (records point at the rows): sizes, kinds and materials are retired, which takes them out of the
 * forms and keeps them on the records that use them. Choosing the project's colour sequence is a project
 * setting (`records.colourSequenceId`, PATCH /api/projects/{id}).
 */

function assertCatalogueManager(actor: Principal, project: Project): void {
  if (!can(actor.role, 'catalogue.manage')) throw new AppError('forbidden', `Your role (${actor.role}) may not do this.`);
  if (actor.organisationId !== project.contractorOrgId) {
    throw new AppError('forbidden', `The catalogues are kept by the contractor's admins and engineers (${project.contractorOrgName}); the network owner's people read them.`);
  }
}

const conflict = (path: string, message: string) => new AppError('conflict', message, [{ path, message }]);
const notFound = (what: string) => new AppError('not_found', `No such ${what} in this project.`);

/** All four catalogues of a project, and which colour sequence it uses. */
export async function projectCatalogues(db: Knex, project: Project) {
  return {
    ductSizes: await listDuctSizes(db, project.id),
    colourSequences: await listColourSequences(db, project.id),
    utilityKinds: await listUtilityKinds(db, project.id),
    backfillMaterials: await listBackfillMaterials(db, project.id),
    colourSequenceId: project.records.colourSequenceId,
  };
}

async function audited<T>(db: Knex, actor: Principal, project: Project, objectType: string, work: (trx: Knex.Transaction) => Promise<{ id: string; action: string; before?: unknown; after: unknown; result: T }>): Promise<T> {
  assertCatalogueManager(actor, project);
  return db.transaction(async (trx) => {
    const r = await work(trx);
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType, objectId: r.id, action: r.action, before: r.before, after: r.after });
    return r.result;
  });
}

const sizeWords = (s: { outerMm: number; innerMm: number; common: boolean; retired: boolean }) => ({ size: `${s.outerMm}/${s.innerMm} mm`, common: s.common, retired: s.retired });

export async function addDuctSize(db: Knex, actor: Principal, project: Project, input: z.infer<typeof ductSizeSchema>) {
  return audited(db, actor, project, 'duct_size', async (trx) => {
    const sizes = await listDuctSizes(trx, project.id);
    if (sizes.some((s) => s.outerMm === input.outerMm && s.innerMm === input.innerMm)) throw conflict('outerMm', `The catalogue already has ${input.outerMm}/${input.innerMm} mm${sizes.find((s) => s.outerMm === input.outerMm && s.innerMm === input.innerMm)!.retired ? ' (retired: bring it back instead)' : ''}.`);
    const [{ id }] = await trx('duct_sizes').insert({ project_id: project.id, outer_mm: input.outerMm, inner_mm: input.innerMm, common: input.common ?? false }).returning('id');
    const size = (await listDuctSizes(trx, project.id)).find((s) => s.id === id)!;
    return { id, action: 'create', after: sizeWords(size), result: size };
  });
}

export async function changeDuctSize(db: Knex, actor: Principal, project: Project, sizeId: string, input: z.infer<typeof ductSizePatchSchema>) {
  return audited(db, actor, project, 'duct_size', async (trx) => {
    const before = (await listDuctSizes(trx, project.id)).find((s) => s.id === sizeId);
    if (!before) throw notFound('duct size');
    await trx('duct_sizes').where({ id: sizeId }).update({ retired: input.retired ?? before.retired, common: input.common ?? before.common });
    const after = (await listDuctSizes(trx, project.id)).find((s) => s.id === sizeId)!;
    return { id: sizeId, action: 'update', before: sizeWords(before), after: sizeWords(after), result: after };
  });
}

export async function addColourSequence(db: Knex, actor: Principal, project: Project, input: z.infer<typeof colourSequenceSchema>) {
  return audited(db, actor, project, 'colour_sequence', async (trx) => {
    const seqs = await listColourSequences(trx, project.id);
    if (seqs.some((s) => s.name.toLowerCase() === input.name.toLowerCase())) throw conflict('name', `The project already has a sequence called ${input.name}.`);
    const [{ id }] = await trx('colour_sequences').insert({ project_id: project.id, name: input.name, standard: input.standard ?? '', repeat_marking: input.repeatMarking }).returning('id');
    await trx('colour_sequence_entries').insert(input.colours.map((c, i) => ({ sequence_id: id, position: i + 1, name: c.name, hex: c.hex })));
    const seq = (await listColourSequences(trx, project.id)).find((s) => s.id === id)!;
    return { id, action: 'create', after: { name: seq.name, standard: seq.standard, repeatMarking: seq.repeatMarking, colours: seq.colours.map((c) => c.name) }, result: seq };
  });
}

export async function addUtilityKind(db: Knex, actor: Principal, project: Project, input: z.infer<typeof utilityKindSchema>) {
  return audited(db, actor, project, 'utility_kind', async (trx) => {
    const kinds = await listUtilityKinds(trx, project.id);
    if (kinds.some((k) => k.key === input.key)) throw conflict('key', `The catalogue already has the kind ${input.key}.`);
    const [{ max }] = await trx('utility_kinds').where({ project_id: project.id }).max<{ max: number | null }[]>('sort as max');
    const [{ id }] = await trx('utility_kinds').insert({ project_id: project.id, key: input.key, label: input.label, sort: (max ?? -1) + 1 }).returning('id');
    const kind = (await listUtilityKinds(trx, project.id)).find((k) => k.id === id)!;
    return { id, action: 'create', after: { key: kind.key, label: kind.label }, result: kind };
  });
}

export async function changeUtilityKind(db: Knex, actor: Principal, project: Project, kindId: string, input: z.infer<typeof utilityKindPatchSchema>) {
  return audited(db, actor, project, 'utility_kind', async (trx) => {
    const before = (await listUtilityKinds(trx, project.id)).find((k) => k.id === kindId);
    if (!before) throw notFound('utility kind');
    await trx('utility_kinds').where({ id: kindId }).update({ label: input.label ?? before.label, retired: input.retired ?? before.retired });
    const after = (await listUtilityKinds(trx, project.id)).find((k) => k.id === kindId)!;
    return { id: kindId, action: 'update', before: { label: before.label, retired: before.retired }, after: { label: after.label, retired: after.retired }, result: after };
  });
}

export async function addBackfillMaterial(db: Knex, actor: Principal, project: Project, input: z.infer<typeof backfillMaterialSchema>) {
  return audited(db, actor, project, 'backfill_material', async (trx) => {
    const all = await listBackfillMaterials(trx, project.id);
    if (all.some((m) => m.label.toLowerCase() === input.label.toLowerCase())) throw conflict('label', `The catalogue already has ${input.label}.`);
    const [{ max }] = await trx('backfill_materials').where({ project_id: project.id }).max<{ max: number | null }[]>('sort as max');
    const [{ id }] = await trx('backfill_materials').insert({ project_id: project.id, label: input.label, sort: (max ?? -1) + 1 }).returning('id');
    const m = (await listBackfillMaterials(trx, project.id)).find((x) => x.id === id)!;
    return { id, action: 'create', after: { label: m.label }, result: m };
  });
}

export async function changeBackfillMaterial(db: Knex, actor: Principal, project: Project, materialId: string, input: z.infer<typeof backfillMaterialPatchSchema>) {
  return audited(db, actor, project, 'backfill_material', async (trx) => {
    const all = await listBackfillMaterials(trx, project.id);
    const before = all.find((m) => m.id === materialId);
    if (!before) throw notFound('backfill material');
    if (input.label && all.some((m) => m.id !== materialId && m.label.toLowerCase() === input.label!.toLowerCase())) throw conflict('label', `The catalogue already has ${input.label}.`);
    await trx('backfill_materials').where({ id: materialId }).update({ label: input.label ?? before.label, retired: input.retired ?? before.retired });
    const after = (await listBackfillMaterials(trx, project.id)).find((m) => m.id === materialId)!;
    return { id: materialId, action: 'update', before: { label: before.label, retired: before.retired }, after: { label: after.label, retired: after.retired }, result: after };
  });
}
