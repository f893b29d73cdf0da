import type { Knex } from 'knex';
import { listBackfillMaterials } from '../../catalogues';
import { productionCorrectionSchema } from '../../../lib/records/production';
import { restorationSchema } from '../../../lib/records/restoration-schema';
import { correctProduction } from '../../../lib/services/production';
import { createRestoration } from '../../../lib/services/restorations';
import type { DemoCtx } from './context';

// The demo's surface restorations on Lanternfield Road (QN-101) and Cobbler Walk (QN-102) over three days
// in November, times on the project's clock. Most pass; one load on QN-101 arrived cold (162 °C against
// 195 ± 15 °C [practice]) and fails, one stretch of QN-102 was laid 2 h 10 min after its edges were cleaned
// (late), one stretch had only two compaction passes. One production correction: sawing on QN-102 ran a day
// ahead of laying, so the 3rd's sawn metres come from the saw's meter. Fictional.

export async function seedRestoration(knex: Knex, ctx: DemoCtx): Promise<void> {
  const { project, surveyor, engineer } = ctx;
  if (await knex('restorations').where({ project_id: project.id }).first('id')) return;
  const route = (ref: string) => {
    const id = ctx.routes.get(ref);
    if (!id) throw new Error(`demo route ${ref} is missing`);
    return id;
  };
  const materials = await listBackfillMaterials(knex, project.id);
  const stone = (materials.find((m) => /4.8/.test(m.label)) ?? materials[0])?.id ?? null;
  const crew = 'Crew 2';
  const add = (body: Record<string, unknown>) => createRestoration(knex, surveyor, project, restorationSchema.parse({ backfillMaterialId: stone, crew, laidThicknessMm: 40, ...body }));

  await add({
    routeId: route('QN-101'), fromChainageM: 0, toChainageM: 140, restoredAt: '2026-11-03T10:00', edgesCleanedAt: '2026-11-03T09:20', surfaceLaidAt: '2026-11-03T09:55',
    temperatures: [{ measuredAt: '2026-11-03T09:50', tempC: 198 }, { measuredAt: '2026-11-03T10:05', tempC: 191 }],
  });
  await add({
    routeId: route('QN-101'), fromChainageM: 140, toChainageM: 280, restoredAt: '2026-11-04T11:30', edgesCleanedAt: '2026-11-04T10:40', surfaceLaidAt: '2026-11-04T11:20',
    temperatures: [{ measuredAt: '2026-11-04T11:15', tempC: 193 }, { measuredAt: '2026-11-04T11:35', tempC: 162 }],
    note: 'Second load waited in traffic; cold at the screed.',
  });
  await add({
    routeId: route('QN-102'), fromChainageM: 0, toChainageM: 70, restoredAt: '2026-11-04T15:00', edgesCleanedAt: '2026-11-04T12:40', surfaceLaidAt: '2026-11-04T14:50',
    temperatures: [{ measuredAt: '2026-11-04T14:45', tempC: 201 }], note: 'Waited for the asphalt lorry after lunch.',
  });
  await add({
    routeId: route('QN-102'), fromChainageM: 70, toChainageM: 130, restoredAt: '2026-11-05T09:40', edgesCleanedAt: '2026-11-05T09:00', surfaceLaidAt: '2026-11-05T09:30',
    compactionPasses: 2, laidThicknessMm: 42, temperatures: [{ measuredAt: '2026-11-05T09:25', tempC: 196 }, { measuredAt: '2026-11-05T09:35', tempC: 189 }],
  });

  await correctProduction(knex, engineer, project, productionCorrectionSchema.parse({
    day: '2026-11-03', crew, quantity: 'sawn_m', value: 383, reason: 'From the saw\'s meter: Cobbler Walk was sawn in the afternoon as well, its ducts laid the next morning (site diary).',
  }));
}
