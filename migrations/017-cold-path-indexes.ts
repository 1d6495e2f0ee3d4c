import type { Knex } from 'knex';

/**
 * Today asks which points had their pre-use check on the studio day: without this index the
 * question read every inspection's entry in the (point_id, kind, inspected_at) index (20,000 on
 * the bench's studio); with it, only that day's pre-use checks (covering: no table read).
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('inspections', (t) => t.index(['studio_day', 'kind', 'point_id', 'inspected_at'], 'inspections_day_kind_point'));
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('inspections', (t) => t.dropIndex(['studio_day', 'kind', 'point_id', 'inspected_at'], 'inspections_day_kind_point'));
}
