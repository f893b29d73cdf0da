import type { Knex } from 'knex';
import { OWNER_ORG } from './01_demo';

// The demo network owner's contact for the duct lookup (fictional). Idempotent: only fills an empty one.
export async function seed(knex: Knex): Promise<void> {
  await knex('organisations').where({ name: OWNER_ORG, contact: '' }).update({ contact: 'Network desk +44 1632 960 417 · network@quillhaven-fibre.example' });
}
