import type { Knex } from 'knex';

// Duct bundles per route stretch, planned (derived from the plan's ducts attribute) and installed (recorded
// by surveyors), their ducts (position, size, colour, purpose), and the joints and connectors recorded on a
// route where a duct may change colour or position (issue 14). A figure nothing measured is NULL: a planned
// bundle says nothing about tracer wire, warning tape or protective fill, nor about a duct's purpose.

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('duct_bundles', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.uuid('route_id').notNullable().references('id').inTable('planned_routes').onDelete('CASCADE');
    t.double('from_chainage_m').notNullable();
    t.double('to_chainage_m').notNullable();
    t.text('kind').notNullable().checkIn(['planned', 'installed'], 'duct_bundles_kind_check');
    t.boolean('tracer_wire');
    t.boolean('warning_tape');
    t.boolean('protective_fill');
    t.text('note').notNullable().defaultTo('');
    // a planned bundle: the plan's ducts text it was derived from
    t.text('planned_spec');
    // the sequence the ducts' colours were resolved in
    t.uuid('colour_sequence_id').references('id').inTable('colour_sequences').onDelete('SET NULL');
    t.uuid('created_by').references('id').inTable('users').onDelete('SET NULL');
    t.uuid('updated_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.check('from_chainage_m >= 0 AND to_chainage_m > from_chainage_m', [], 'duct_bundles_stretch_check');
    t.check("kind = 'planned' OR (tracer_wire IS NOT NULL AND warning_tape IS NOT NULL AND protective_fill IS NOT NULL)", [], 'duct_bundles_installed_flags_check');
    t.index(['project_id', 'route_id', 'from_chainage_m'], 'duct_bundles_project_route_from_idx');
    t.index(['route_id'], 'duct_bundles_route_idx');
  });

  await knex.schema.createTable('duct_bundle_ducts', (t) => {
    t.bigIncrements('id');
    t.uuid('bundle_id').notNullable().references('id').inTable('duct_bundles').onDelete('CASCADE');
    t.integer('position').notNullable();
    // a size of the project's catalogue, or a custom one (duct_size_id NULL); the diameters are kept either way
    t.uuid('duct_size_id').references('id').inTable('duct_sizes').onDelete('SET NULL');
    t.double('outer_mm').notNullable();
    // NULL only for a planned duct whose plan gives the outer diameter alone
    t.double('inner_mm');
    // the position in the colour sequence, and the colour it stood for when recorded
    t.integer('colour_position');
    t.text('colour_name');
    t.text('colour_hex');
    t.text('colour_marking').checkIn(['stripe', 'tracer'], 'duct_bundle_ducts_marking_check');
    t.text('purpose').checkIn(['feeder', 'distribution', 'drop', 'spare'], 'duct_bundle_ducts_purpose_check');
    t.check('position >= 1', [], 'duct_bundle_ducts_position_check');
    t.check('outer_mm > 0 AND outer_mm <= 100 AND (inner_mm IS NULL OR (inner_mm > 0 AND inner_mm < outer_mm))', [], 'duct_bundle_ducts_size_check');
    t.check('colour_position IS NULL OR colour_position >= 1', [], 'duct_bundle_ducts_colour_check');
    t.unique(['bundle_id', 'position'], { indexName: 'duct_bundle_ducts_bundle_position_unique' });
    t.index(['duct_size_id'], 'duct_bundle_ducts_size_idx');
  });

  await knex.schema.createTable('duct_joints', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.uuid('route_id').notNullable().references('id').inTable('planned_routes').onDelete('CASCADE');
    t.double('chainage_m').notNullable();
    t.double('offset_m').notNullable().defaultTo(0);
    t.specificType('geom', 'geometry(Point, 4326)').notNullable();
    t.text('kind').notNullable().checkIn(['joint', 'connector'], 'duct_joints_kind_check');
    // the duct positions joined there
    t.specificType('duct_positions', 'integer[]').notNullable();
    t.text('note').notNullable().defaultTo('');
    t.uuid('created_by').references('id').inTable('users').onDelete('SET NULL');
    t.uuid('updated_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.check('cardinality(duct_positions) >= 1', [], 'duct_joints_positions_check');
    t.index(['project_id', 'route_id', 'chainage_m'], 'duct_joints_project_route_chainage_idx');
  });
  await knex.raw('CREATE INDEX duct_joints_geom_gist ON duct_joints USING GIST (geom)');
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('duct_joints');
  await knex.schema.dropTable('duct_bundle_ducts');
  await knex.schema.dropTable('duct_bundles');
}
