import type { Knex } from 'knex';
import { addUser } from '../../lib/services/operators';
import { loadPrincipal } from '../../lib/auth/principal';
import { createProject } from '../../lib/services/projects';
import { findOrganisationByName } from '../organisations';

// The demo scenario: the fictional town of Quillhaven, its fictional network owner and contractor,
// and one person per role. Idempotent: a second run finds everything in place and adds nothing.
export const DEMO_PASSWORD = 'quillhaven-demo-2026';
export const OWNER_ORG = 'Quillhaven Open Fibre';
export const CONTRACTOR_ORG = 'Tarnwick Slot & Duct Ltd';
export const DEMO_PROJECT = 'Quillhaven North, phase 1';

export const DEMO_USERS = [
  { email: 'admin@quillhaven-fibre.example', name: 'Maren Oakfield', role: 'admin', org: OWNER_ORG, orgKind: 'owner' },
  { email: 'owner@quillhaven-fibre.example', name: 'Tobiah Wrenlow', role: 'owner', org: OWNER_ORG, orgKind: 'owner' },
  { email: 'maintenance@quillhaven-fibre.example', name: 'Edda Corrigal', role: 'maintenance', org: OWNER_ORG, orgKind: 'owner' },
  { email: 'admin@tarnwick-civils.example', name: 'Ilse Marrowby', role: 'admin', org: CONTRACTOR_ORG, orgKind: 'contractor' },
  { email: 'engineer@tarnwick-civils.example', name: 'Osric Fennimore', role: 'engineer', org: CONTRACTOR_ORG, orgKind: 'contractor' },
  { email: 'surveyor@tarnwick-civils.example', name: 'Pia Halloway', role: 'surveyor', org: CONTRACTOR_ORG, orgKind: 'contractor' },
] as const;

export async function seed(knex: Knex): Promise<void> {
  for (const u of DEMO_USERS) await addUser(knex, { ...u, password: DEMO_PASSWORD, token: false });

  const owner = await findOrganisationByName(knex, OWNER_ORG);
  const exists = await knex('projects').where({ owner_org_id: owner!.id }).whereRaw('lower(name) = lower(?)', [DEMO_PROJECT]).first();
  if (exists) return;
  const admin = await knex('users').where({ email: DEMO_USERS[0].email }).first('id');
  const actor = (await loadPrincipal(knex, admin.id))!;
  await createProject(knex, actor, {
    name: DEMO_PROJECT,
    partnerOrganisation: CONTRACTOR_ORG,
    areaName: 'Quillhaven North',
    defaultCrs: 25832,
    extent: [9.1012, 52.1018, 9.1195, 52.1101],
    timeZone: 'Europe/Berlin',
    unitSystem: 'metric',
    minCoverDepthM: 0.4,
    lateralToleranceM: 0.5,
    defaultAccuracyClass: 'rtk_gnss',
    accuracySigmas: {},
  });
}
