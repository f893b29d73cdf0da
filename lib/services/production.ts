import type { Knex } from 'knex';
import { writeAudit } from '@/db/audit';
import { deleteProductionCorrection, getProductionCorrection, insertProductionCorrection, listProductionCorrections, listProductionFacts } from '@/db/production';
import type { Project } from '@/db/projects';
import { AppError } from '@/lib/api/errors';
import { auditActor, type Principal } from '@/lib/auth/principal';
import { aggregateProduction, type ProductionCorrection, type ProductionCorrectionInput, type ProductionDay } from '@/lib/records/production';
import { assertContractorWriter } from './road-crossings';

/** Daily production per crew and day (newest first), derived from the records, with the corrections applied. */
export async function projectProduction(db: Knex, project: Project, range: { from?: string; to?: string } = {}): Promise<ProductionDay[]> {
  const [facts, corrections] = await Promise.all([listProductionFacts(db, project.id, project.timeZone), listProductionCorrections(db, project.id)]);
  return aggregateProduction(facts, corrections, range);
}

const audited = (c: ProductionCorrection) => ({ day: c.day, crew: c.crew, quantity: c.quantity, value: c.value, reason: c.reason });

/**
 * Corrects one figure of a day and crew by hand. The derived figure stays beside it; the audit entry keeps
 * what was derived when the correction was made.
 */
export async function correctProduction(db: Knex, actor: Principal, project: Project, input: ProductionCorrectionInput): Promise<ProductionCorrection> {
  assertContractorWriter(actor, project);
  const id = await db.transaction(async (trx) => {
    const newId = await insertProductionCorrection(trx, project.id, { day: input.day, crew: input.crew ?? '', quantity: input.quantity, value: input.value, reason: input.reason }, actor.id);
    const c = (await getProductionCorrection(trx, newId))!;
    const facts = await listProductionFacts(trx, project.id, project.timeZone);
    const derived = aggregateProduction(facts, [], { from: c.day, to: c.day }).find((d) => d.crew === c.crew)?.figures[c.quantity].derived ?? null;
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'production_correction', objectId: newId, action: 'create', after: { ...audited(c), derived } });
    return newId;
  });
  return (await getProductionCorrection(db, id))!;
}

/** Withdraws a correction: the figure falls back to the previous correction, or the derived one. */
export async function withdrawProductionCorrection(db: Knex, actor: Principal, project: Project, id: string): Promise<void> {
  assertContractorWriter(actor, project);
  await db.transaction(async (trx) => {
    const before = await getProductionCorrection(trx, id);
    if (!before || before.projectId !== project.id) throw new AppError('not_found', 'No such production correction in this project.');
    await deleteProductionCorrection(trx, id);
    await writeAudit(trx, auditActor(actor), { projectId: project.id, objectType: 'production_correction', objectId: id, action: 'delete', before: audited(before) });
  });
}
