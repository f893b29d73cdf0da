import type { Knex } from 'knex';
import type { Project } from '../../projects';
import type { Principal } from '../../../lib/auth/principal';

/** What every part of the demo's trench records needs: the demo project, its people and its routes. */
export interface DemoCtx {
  knex: Knex;
  projectId: string;
  project: Project;
  surveyor: Principal;
  engineer: Principal;
  /** planned route id by reference (QN-101 …) */
  routes: Map<string, string>;
}
