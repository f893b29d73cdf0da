import type { Knex } from 'knex';

// A not-built stretch cannot be approved (nothing was laid to approve), so it could never be settled and a
// project never fully reviewed. An engineer now acknowledges it, with a reason: `acknowledged` counts as
// settled beside `approved`.
export async function up(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE sections DROP CONSTRAINT sections_review_check');
  await knex.raw("ALTER TABLE sections ADD CONSTRAINT sections_review_check CHECK (review IN ('pending', 'approved', 'rejected', 'acknowledged'))");
}

export async function down(knex: Knex): Promise<void> {
  await knex('sections').where({ review: 'acknowledged' }).update({ review: 'pending', reviewed_by: null, reviewed_at: null });
  await knex.raw('ALTER TABLE sections DROP CONSTRAINT sections_review_check');
  await knex.raw("ALTER TABLE sections ADD CONSTRAINT sections_review_check CHECK (review IN ('pending', 'approved', 'rejected'))");
}
