import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  // An engineer's correction of the derived record. It is kept as an instruction, not as an edit of a
  // section, and every reconciliation run applies it again: corrections outlive re-runs, new uploads
  // and plan revisions because they name routes by reference and stretches by chainage.
  await knex.schema.createTable('section_corrections', (t) => {
    t.bigIncrements('id');
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.text('kind').notNullable().checkIn(['split', 'merge', 'reassign', 'mark_built', 'promote', 'not_built_reason'], 'section_corrections_kind_check');
    t.text('planned_route_ref');
    t.double('from_chainage_m');
    t.double('to_chainage_m');
    t.text('target_route_ref');
    t.uuid('source_upload_id').references('id').inTable('uploads').onDelete('SET NULL');
    t.double('sigma_m');
    t.date('laid_on');
    t.text('reason').notNullable();
    // the section the engineer was looking at; it may later be retired or split
    t.uuid('section_id').references('id').inTable('sections').onDelete('SET NULL');
    t.uuid('created_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.uuid('withdrawn_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('withdrawn_at', { useTz: true });
    t.index(['project_id'], 'section_corrections_project_idx');
  });

  await knex.schema.alterTable('sections', (t) => {
    // why a stretch is not built, or on what other source it is counted built
    t.text('note');
    t.specificType('correction_ids', 'bigint[]').notNullable().defaultTo('{}');
  });

  // the matched observations of the latest run, per route and upload, for the offset-versus-chainage plot
  await knex.schema.createTable('route_observations', (t) => {
    t.bigIncrements('id');
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.integer('run').notNullable();
    t.text('planned_route_ref').notNullable();
    t.uuid('upload_id').notNullable().references('id').inTable('uploads').onDelete('CASCADE');
    t.specificType('chainage_m', 'double precision[]').notNullable();
    t.specificType('offset_m', 'double precision[]').notNullable();
    t.index(['project_id', 'planned_route_ref'], 'route_observations_project_ref_idx');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('route_observations');
  await knex.schema.alterTable('sections', (t) => {
    t.dropColumn('correction_ids');
    t.dropColumn('note');
  });
  await knex.schema.dropTable('section_corrections');
}
