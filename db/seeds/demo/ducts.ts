import type { Knex } from 'knex';
import { listDuctSizes } from '../../catalogues';
import { ductBundleSchema, ductJointSchema } from '../../../lib/records/duct-schemas';
import { createDuctBundle, createDuctJoint, refreshPlannedBundles } from '../../../lib/services/duct-bundles';
import type { DemoCtx } from './context';

// The demo's duct bundles: planned ones derived from the design's ducts attribute, and what the crews laid
// on Lanternfield Road (QN-101) and Cobbler Walk (QN-102). On QN-101 the slate and white ducts (5 and 6)
// swap places at 95 m with nothing recorded there: a continuity break for the engineer to look into. On
// QN-102 a damaged green duct was cut out at 64.5 m and a yellow one coupled in: the connector is recorded,
// so the change of colour there is no break.
export async function seedDucts(knex: Knex, ctx: DemoCtx): Promise<void> {
  await refreshPlannedBundles(knex, ctx.engineer, ctx.project);
  const sizes = await listDuctSizes(knex, ctx.projectId);
  const size74 = sizes.find((s) => s.outerMm === 7 && s.innerMm === 4)!.id;
  const length = async (ref: string) => (await knex('planned_routes').where({ id: ctx.routes.get(ref) }).first('length_m')).length_m as number;
  const purpose = (i: number, n: number) => (i < 2 ? 'feeder' : i >= n - 2 ? 'spare' : 'distribution');
  const bundle = (ref: string, from: number, to: number, colours: number[], flags: { tracerWire: boolean; warningTape: boolean; protectiveFill: boolean }, note = '') =>
    ductBundleSchema.parse({
      routeId: ctx.routes.get(ref),
      fromChainageM: from,
      toChainageM: Number(to.toFixed(2)),
      ducts: colours.map((c, i) => ({ ductSizeId: size74, colourPosition: c, purpose: purpose(i, colours.length) })),
      ...flags,
      note,
    });
  const inOrder = (n: number) => Array.from({ length: n }, (_, i) => i + 1);
  const laid = { tracerWire: true, warningTape: true, protectiveFill: false };

  const qn101 = Math.min(await length('QN-101'), 280);
  await createDuctBundle(knex, ctx.surveyor, ctx.project, bundle('QN-101', 0, 95, inOrder(12), laid, 'Laid from the cabinet end.'));
  const swapped = [1, 2, 3, 4, 6, 5, 7, 8, 9, 10, 11, 12];
  await createDuctBundle(knex, ctx.surveyor, ctx.project, bundle('QN-101', 95, 190, swapped, laid));
  await createDuctBundle(knex, ctx.surveyor, ctx.project, bundle('QN-101', 190, qn101, swapped, { ...laid, protectiveFill: true }, 'Protective fill over the ducts by the school entrance.'));

  const qn102 = await length('QN-102');
  await createDuctBundle(knex, ctx.surveyor, ctx.project, bundle('QN-102', 0, 64.5, inOrder(7), laid));
  await createDuctBundle(knex, ctx.surveyor, ctx.project, bundle('QN-102', 64.5, qn102, [1, 2, 9, 4, 5, 6, 7], laid, 'Duct 3 is yellow from the connector at 64.5 m on.'));
  await createDuctJoint(
    knex,
    ctx.surveyor,
    ctx.project,
    ductJointSchema.parse({ routeId: ctx.routes.get('QN-102'), chainageM: 64.5, kind: 'connector', ductPositions: [3], note: 'Green duct crushed by the excavator; cut out and a yellow length coupled in.' }),
  );
}
