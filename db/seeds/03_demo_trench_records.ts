import type { Knex } from 'knex';
import { getProject } from '../projects';
import { loadPrincipal } from '../../lib/auth/principal';
import { DEMO_PROJECT, DEMO_USERS } from './01_demo';
import type { DemoCtx } from './demo/context';
import { seedDucts } from './demo/ducts';
import { seedDepths } from './demo/depths';
import { seedCrossingsPhotos } from './demo/crossings-photos';
import { seedRestoration } from './demo/restoration';

// The demo's trench records in Quillhaven North: what the crews laid, how deep, what they found in the
// ground, how they put the road back and what they did each day, with some records failing a check so that
// an engineer signing in finds something to do on the quality-checks page. Fictional, idempotent.
export async function seed(knex: Knex): Promise<void> {
  const row = await knex('projects').whereRaw('lower(name) = lower(?)', [DEMO_PROJECT]).first('id');
  if (!row) return;
  if (!(await knex('reconcile_runs').where({ project_id: row.id }).first('id'))) return;
  // records already there: a second run adds nothing
  if (await knex('depth_readings').where({ project_id: row.id }).first('id')) return;
  const userId = async (role: string) => (await knex('users').where({ email: DEMO_USERS.find((u) => u.role === role)!.email }).first('id')).id;
  const routes = new Map<string, string>((await knex('planned_routes').where({ project_id: row.id }).select('ref', 'id')).map((r: { ref: string; id: string }) => [r.ref, r.id]));
  const ctx: DemoCtx = {
    knex,
    projectId: row.id,
    project: (await getProject(knex, row.id))!,
    surveyor: (await loadPrincipal(knex, await userId('surveyor')))!,
    engineer: (await loadPrincipal(knex, await userId('engineer')))!,
    routes,
  };
  await seedDucts(knex, ctx);
  await seedDepths(knex, ctx);
  await seedCrossingsPhotos(knex, ctx);
  await seedRestoration(knex, ctx);
}
