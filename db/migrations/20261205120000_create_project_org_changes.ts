import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  // A proposed change of a project's network owner or contractor. An admin of one of the project's two
  // organisations proposes it; it takes effect only when an admin of the other confirms, so that neither
  // side can move a project out of the other's sight on its own.
  await knex.schema.createTable('project_org_changes', (t) => {
    t.bigIncrements('id');
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.text('side').notNullable().checkIn(['owner', 'contractor'], 'project_org_changes_side_check');
    t.uuid('from_org_id').notNullable().references('id').inTable('organisations').onDelete('RESTRICT');
    t.uuid('to_org_id').notNullable().references('id').inTable('organisations').onDelete('RESTRICT');
    t.text('reason').notNullable();
    t.uuid('proposed_by').references('id').inTable('users').onDelete('SET NULL');
    t.uuid('proposed_by_org_id').notNullable().references('id').inTable('organisations').onDelete('RESTRICT');
    t.timestamp('proposed_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text('status').notNullable().defaultTo('pending').checkIn(['pending', 'confirmed', 'declined', 'withdrawn'], 'project_org_changes_status_check');
    t.uuid('answered_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('answered_at', { useTz: true });
    t.text('answer_note');
    t.index(['project_id', 'proposed_at'], 'project_org_changes_project_idx');
  });
  // one open proposal per project at a time: a second would race the first
  await knex.raw("CREATE UNIQUE INDEX project_org_changes_one_pending_idx ON project_org_changes (project_id) WHERE status = 'pending'");
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('project_org_changes');
}
