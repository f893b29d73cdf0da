import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  // σ per axis (1-sigma, metres) per accuracy class, overriding the built-in defaults for one project
  await knex.schema.alterTable('projects', (t) => {
    t.jsonb('accuracy_sigmas').notNullable().defaultTo('{}');
  });

  await knex.schema.createTable('uploads', (t) => {
    t.uuid('id').primary();
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.text('sha256').notNullable();
    t.bigInteger('size_bytes').notNullable();
    t.text('file_name').notNullable();
    t.text('format');
    t.text('crs');
    t.text('status').notNullable().checkIn(['stored', 'failed', 'withdrawn', 'superseded'], 'uploads_status_check');
    t.text('error_code');
    t.text('error_message');
    t.jsonb('error_details');
    t.jsonb('warnings').notNullable().defaultTo('[]');
    t.text('accuracy_class').notNullable();
    t.double('sigma_m').notNullable();
    t.date('survey_date');
    t.text('crew').notNullable().defaultTo('');
    t.text('content').notNullable().checkIn(['trench', 'road_crossings', 'test_pits', 'depth_shots', 'mixed'], 'uploads_content_check');
    t.jsonb('columns');
    t.integer('feature_count').notNullable().defaultTo(0);
    t.integer('point_count').notNullable().defaultTo(0);
    t.uuid('superseded_by').references('id').inTable('uploads').onDelete('SET NULL');
    t.uuid('uploaded_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['project_id', 'sha256'], { indexName: 'uploads_project_sha256_unique' });
    t.index(['project_id', 'created_at'], 'uploads_project_created_idx');
  });

  // the original files of an upload, byte for byte (a shapefile set has several)
  await knex.schema.createTable('upload_files', (t) => {
    t.bigIncrements('id');
    t.uuid('upload_id').notNullable().references('id').inTable('uploads').onDelete('CASCADE');
    t.text('file_name').notNullable();
    t.text('storage_key').notNullable();
    t.text('sha256').notNullable();
    t.bigInteger('size_bytes').notNullable();
    t.index(['upload_id'], 'upload_files_upload_idx');
  });

  await knex.schema.createTable('upload_features', (t) => {
    t.bigIncrements('id');
    t.uuid('upload_id').notNullable().references('id').inTable('uploads').onDelete('CASCADE');
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.integer('seq').notNullable();
    t.text('kind').notNullable().checkIn(['line', 'point'], 'upload_features_kind_check');
    t.text('name');
    t.specificType('geom', 'geometry(Geometry, 4326)').notNullable();
    t.integer('point_count').notNullable();
    // heights (m) per position, kept beside the 2D geometry so a missing height stays missing, not zero
    t.specificType('heights', 'double precision[]');
    t.specificType('times', 'timestamptz[]');
    t.jsonb('point_attributes');
    t.jsonb('attributes').notNullable().defaultTo('{}');
    t.index(['upload_id', 'seq'], 'upload_features_upload_seq_idx');
  });
  await knex.raw('CREATE INDEX upload_features_geom_gist ON upload_features USING GIST (geom)');
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('upload_features');
  await knex.schema.dropTable('upload_files');
  await knex.schema.dropTable('uploads');
  await knex.schema.alterTable('projects', (t) => {
    t.dropColumn('accuracy_sigmas');
  });
}
