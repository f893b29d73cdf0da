import type { Knex } from 'knex';

// Handover packages (issue 16): what the network owner receives and keeps. Each package is a revision of its
// project (1, 2, …), built by a background job into one ZIP in the originals store; an issued revision is
// immutable. The owner accepts it or returns it with comments (per section or general); the contractor
// answers with a new revision. `snapshot` is the compact content the next revision's change report compares
// against; `created_at` is the package's stated time, written into every file, so that building the same
// revision again gives the same bytes.

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('handovers', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').notNullable().references('id').inTable('projects').onDelete('CASCADE');
    t.integer('revision').notNullable();
    t.text('status').notNullable().defaultTo('building').checkIn(['building', 'issued', 'failed', 'accepted', 'returned'], 'handovers_status_check');
    // { routes?: string[] (route references), bbox?: [w, s, e, n] }; empty: every approved section
    t.jsonb('scope').notNullable().defaultTo('{}');
    t.text('note').notNullable().defaultTo('');
    t.uuid('job_id').references('id').inTable('jobs').onDelete('SET NULL');
    t.text('failure_reason');
    t.text('file_name');
    t.text('storage_key');
    t.bigInteger('size_bytes');
    t.text('sha256');
    t.jsonb('manifest');
    t.jsonb('change_report');
    t.jsonb('snapshot');
    t.text('generator_version');
    t.uuid('created_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('issued_at', { useTz: true });
    t.uuid('reviewed_by').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('reviewed_at', { useTz: true });
    t.text('review_comment').notNullable().defaultTo('');
    t.unique(['project_id', 'revision'], { indexName: 'handovers_project_revision_unique' });
    t.check('revision >= 1', [], 'handovers_revision_check');
    // a package that can be downloaded has its file; one that failed says why
    t.check("(status IN ('issued', 'accepted', 'returned')) = (storage_key IS NOT NULL AND sha256 IS NOT NULL)", [], 'handovers_file_check');
    t.check("status <> 'failed' OR failure_reason IS NOT NULL", [], 'handovers_failure_check');
    t.check("(status IN ('accepted', 'returned')) = (reviewed_at IS NOT NULL)", [], 'handovers_review_check');
  });

  await knex.schema.createTable('handover_comments', (t) => {
    t.bigIncrements('id');
    t.uuid('handover_id').notNullable().references('id').inTable('handovers').onDelete('CASCADE');
    // a comment on one section, or on the package as a whole (null)
    t.uuid('section_id').references('id').inTable('sections').onDelete('SET NULL');
    // the owner's comment when returning, or the contractor's answer
    t.text('kind').notNullable().checkIn(['return', 'answer'], 'handover_comments_kind_check');
    t.bigInteger('answers_id').references('id').inTable('handover_comments').onDelete('SET NULL');
    t.text('text').notNullable();
    t.uuid('author_id').references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.check("length(text) BETWEEN 1 AND 4000", [], 'handover_comments_text_check');
    t.index(['handover_id', 'created_at'], 'handover_comments_handover_created_idx');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('handover_comments');
  await knex.schema.dropTable('handovers');
}
