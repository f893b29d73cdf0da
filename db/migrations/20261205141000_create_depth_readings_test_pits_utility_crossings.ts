import type { Knex } from 'knex';

// Depth readings, test pits and the utilities found by them or by ground-penetrating radar (issue 14).
// Each is a point record: a planned route, a chainage and a signed offset on it, and the position (measured,
// or the route's point at a typed chainage). Depths are stored in metres; a figure not measured is NULL.

function pointAnchor(knex: Knex, t: Knex.CreateTableBuilder): void {
  t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
  t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
  t.uuid('route_id').notNullable().references('id').inTable('planned_routes').onDelete('CASCADE');
  t.double('chainage_m').notNullable();
  t.double('offset_m').notNullable().defaultTo(0);
  t.specificType('geom', 'geometry(Point, 4326)').notNullable();
}

function stamps(knex: Knex, t: Knex.CreateTableBuilder): void {
  t.uuid('created_by').references('id').inTable('users').onDelete('SET NULL');
  t.uuid('updated_by').references('id').inTable('users').onDelete('SET NULL');
  t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
}

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('depth_readings', (t) => {
    pointAnchor(knex, t);
    // cover: surface to the top of the uppermost duct; trench depth: surface to the slot's bottom
    t.double('cover_m');
    t.double('trench_depth_m');
    t.timestamp('measured_at', { useTz: true });
    t.text('source').notNullable().defaultTo('typed').checkIn(['typed', 'csv', 'upload'], 'depth_readings_source_check');
    t.uuid('upload_id').references('id').inTable('uploads').onDelete('SET NULL');
    // the file's row (CSV, header = 1) or feature number, and the vertex within a line feature
    t.integer('source_row');
    t.integer('source_vertex');
    t.text('note').notNullable().defaultTo('');
    stamps(knex, t);
    t.check('cover_m IS NOT NULL OR trench_depth_m IS NOT NULL', [], 'depth_readings_some_depth');
    t.check('cover_m IS NULL OR (cover_m >= 0 AND cover_m <= 10)', [], 'depth_readings_cover_range');
    t.check('trench_depth_m IS NULL OR (trench_depth_m > 0 AND trench_depth_m <= 10)', [], 'depth_readings_depth_range');
    t.index(['project_id', 'route_id', 'chainage_m'], 'depth_readings_project_route_chainage_idx');
    t.index(['upload_id'], 'depth_readings_upload_idx');
  });
  await knex.raw('CREATE INDEX depth_readings_geom_gist ON depth_readings USING GIST (geom)');

  await knex.schema.createTable('test_pits', (t) => {
    pointAnchor(knex, t);
    t.text('name').notNullable().defaultTo('');
    t.date('dug_on');
    t.text('method').notNullable().defaultTo('hand_dug').checkIn(['hand_dug', 'vacuum', 'other'], 'test_pits_method_check');
    t.double('depth_m');
    t.text('findings').notNullable().defaultTo('');
    // pits taken from an upload's waypoints or survey points: which upload and which of its features
    t.uuid('upload_id').references('id').inTable('uploads').onDelete('SET NULL');
    t.integer('source_seq');
    stamps(knex, t);
    t.check('depth_m IS NULL OR (depth_m > 0 AND depth_m <= 10)', [], 'test_pits_depth_range');
    t.index(['project_id', 'route_id', 'chainage_m'], 'test_pits_project_route_chainage_idx');
    t.index(['upload_id'], 'test_pits_upload_idx');
  });
  await knex.raw('CREATE INDEX test_pits_geom_gist ON test_pits USING GIST (geom)');

  await knex.schema.createTable('utility_crossings', (t) => {
    pointAnchor(knex, t);
    t.uuid('pit_id').references('id').inTable('test_pits').onDelete('SET NULL');
    t.uuid('utility_kind_id').notNullable().references('id').inTable('utility_kinds').onDelete('RESTRICT');
    t.text('owner').notNullable().defaultTo('');
    // depth to the top of the utility, and the vertical clearance between it and our ducts
    t.double('depth_m');
    t.double('clearance_m');
    t.text('method').notNullable().checkIn(['gpr', 'test_pit', 'records', 'other'], 'utility_crossings_method_check');
    t.date('found_on');
    t.text('note').notNullable().defaultTo('');
    stamps(knex, t);
    t.check('depth_m IS NULL OR (depth_m >= 0 AND depth_m <= 20)', [], 'utility_crossings_depth_range');
    t.check('clearance_m IS NULL OR (clearance_m >= 0 AND clearance_m <= 20)', [], 'utility_crossings_clearance_range');
    t.index(['project_id', 'route_id', 'chainage_m'], 'utility_crossings_project_route_chainage_idx');
    t.index(['pit_id'], 'utility_crossings_pit_idx');
    t.index(['utility_kind_id'], 'utility_crossings_kind_idx');
  });
  await knex.raw('CREATE INDEX utility_crossings_geom_gist ON utility_crossings USING GIST (geom)');
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('utility_crossings');
  await knex.schema.dropTable('test_pits');
  await knex.schema.dropTable('depth_readings');
}
