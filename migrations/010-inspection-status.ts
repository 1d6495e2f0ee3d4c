import type { Knex } from 'knex';

/**
 * The point's status as the rules saw it the moment an inspection was signed (PRODUCT.md §10: a
 * past record is never re-shown with today's status). Rows written before this migration keep
 * NULL: the log then says what the row itself records and that the status was not kept.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('inspections', (t) => {
    t.string('point_status', 10); // cleared | expiring | blocked; NULL for a gear item inspected on its own
    t.text('point_reasons_json'); // [{ code, message }]
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('inspections', (t) => {
    t.dropColumn('point_status');
    t.dropColumn('point_reasons_json');
  });
}
