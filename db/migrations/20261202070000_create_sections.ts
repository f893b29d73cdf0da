import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  // The spine of the record: everything recorded later (ducts, depths, crossings, households, handover)
  // hangs off a section, which keeps its id across re-runs as long as it is the same stretch.
  await knex.schema.createTable('sections', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.text('planned_route_ref');
    t.text('status').notNullable().checkIn(['as_planned', 'deviates', 'unplanned', 'not_built'], 'sections_status_check');
    t.double('from_chainage_m').notNullable();
    t.double('to_chainage_m').notNullable();
    t.specificType('geom', 'geometry(LineString, 4326)').notNullable();
    t.double('length_m').notNullable();
    t.double('max_offset_m').notNullable();
    t.double('p95_offset_m').notNullable();
    t.double('accuracy_m').notNullable();
    t.specificType('source_upload_ids', 'uuid[]').notNullable().defaultTo('{}');
    t.date('laid_on');
    t.text('review').notNullable().defaultTo('pending').checkIn(['pending', 'approved', 'rejected'], 'sections_review_check');
    t.text('review_comment').notNullable().defaultTo('');
    t.uuid('reviewed_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('reviewed_at', { useTz: true });
    // a split or extension keeps the link to the section it came from
    t.uuid('derived_from').references('id').inTable('sections').onDelete('SET NULL');
    t.integer('first_run').notNullable();
    t.integer('last_run').notNullable();
    // set when a later run no longer finds this stretch; the row and what hangs off it stay
    t.integer('retired_in_run');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['project_id', 'planned_route_ref'], 'sections_project_ref_idx');
  });
  await knex.raw('CREATE INDEX sections_geom_gist ON sections USING GIST (geom)');

  await knex.schema.createTable('reconcile_runs', (t) => {
    t.bigIncrements('id');
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.integer('run').notNullable();
    t.uuid('job_id').references('id').inTable('jobs').onDelete('SET NULL');
    t.jsonb('stats').notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['project_id', 'run'], { indexName: 'reconcile_runs_project_run_unique' });
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('reconcile_runs');
  await knex.schema.dropTable('sections');
}
