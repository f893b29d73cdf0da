import type { Knex } from 'knex';
import { listUtilityKinds } from '../../catalogues';
import { mulberry32 } from '../../../lib/records/seeded-random';
import { createDepthReading, depthReadingSchema } from '../../../lib/services/depth-readings';
import { createTestPit, createUtilityCrossing, testPitSchema, utilityCrossingSchema } from '../../../lib/services/test-pits';
import type { DemoCtx } from './context';

// The demo's depth readings, test pits and the utilities found before sawing, on Lanternfield Road (QN-101)
// and Cobbler Walk (QN-102). A reading about every 20 m, cover mostly 0.44–0.56 m against the project's
// minimum of 0.40 m, two below it (a high gas service forced the slot shallower at QN-101 150 m; a rock
// band at QN-102 70 m). Two hand- and vacuum-dug pits: a water main with enough clearance, and a gas
// service only 0.12 m above the ducts, below the 0.30 m minimum clearance. Fictional, seeded randomness.
export async function seedDepths(knex: Knex, ctx: DemoCtx): Promise<void> {
  const rand = mulberry32(1405);
  const length = async (ref: string) => (await knex('planned_routes').where({ id: ctx.routes.get(ref) }).first('length_m')).length_m as number;
  const shallow = new Map<string, number>([['QN-101 150', 0.36], ['QN-102 70', 0.37]]);
  for (const [ref, day] of [['QN-101', '2026-11-03'], ['QN-102', '2026-11-04']] as const) {
    const routeId = ctx.routes.get(ref);
    if (!routeId) continue;
    const len = await length(ref);
    let minute = 0;
    for (let c = 10; c <= len - 2; c += 20) {
      const cover = shallow.get(`${ref} ${c}`) ?? Number((0.44 + rand() * 0.12).toFixed(2));
      // a 12-duct bundle of 7 mm ducts stands about 6–8 cm in the slot [practice]
      const trench = Number((cover + 0.06 + rand() * 0.02).toFixed(2));
      minute += 6 + Math.floor(rand() * 6);
      const hh = String(8 + Math.floor(minute / 60)).padStart(2, '0');
      const mm = String(minute % 60).padStart(2, '0');
      const note = shallow.has(`${ref} ${c}`) ? (ref === 'QN-101' ? 'Slot raised over a high gas service' : 'Rock band, saw could not go deeper') : '';
      await createDepthReading(knex, ctx.surveyor, ctx.project, depthReadingSchema.parse({ routeId, chainageM: c, coverM: cover, trenchDepthM: trench, measuredAt: `${day}T${hh}:${mm}`, note }));
    }
  }
  const kinds = await listUtilityKinds(knex, ctx.projectId);
  const kind = (key: string) => kinds.find((k) => k.key === key)!.id;
  const q101 = ctx.routes.get('QN-101');
  const q102 = ctx.routes.get('QN-102');
  if (q101) {
    const pit = await createTestPit(knex, ctx.surveyor, ctx.project, testPitSchema.parse({ routeId: q101, chainageM: 62, name: 'TP-101', dugOn: '2026-10-30', method: 'hand_dug', depthM: 0.95, findings: 'Cast-iron water main crossing at 0.85 m to its crown; sand bed, no damage.' }));
    await createUtilityCrossing(knex, ctx.surveyor, ctx.project, utilityCrossingSchema.parse({ routeId: q101, chainageM: 62, pitId: pit.id, utilityKindId: kind('water'), owner: 'Quillhaven Water', depthM: 0.85, clearanceM: 0.33, method: 'test_pit', foundOn: '2026-10-30' }));
    await createUtilityCrossing(knex, ctx.surveyor, ctx.project, utilityCrossingSchema.parse({ routeId: q101, chainageM: 214, utilityKindId: kind('power'), owner: 'North Vale Power', depthM: 0.9, clearanceM: 0.38, method: 'gpr', foundOn: '2026-10-29', note: 'Low-voltage cable by radar, parallel for 3 m' }));
  }
  if (q102) {
    const pit = await createTestPit(knex, ctx.surveyor, ctx.project, testPitSchema.parse({ routeId: q102, chainageM: 38, name: 'TP-102', dugOn: '2026-10-30', method: 'vacuum', depthM: 0.8, findings: 'PE gas service to no. 14 at 0.62 m, higher than the records show.' }));
    await createUtilityCrossing(knex, ctx.surveyor, ctx.project, utilityCrossingSchema.parse({ routeId: q102, chainageM: 38, pitId: pit.id, utilityKindId: kind('gas'), owner: 'Fenward Gas Networks', depthM: 0.62, clearanceM: 0.12, method: 'test_pit', foundOn: '2026-10-30', note: 'Owner informed; slot kept as shallow as allowed here' }));
  }
}
