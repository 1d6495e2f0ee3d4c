import type { Knex } from 'knex';

const APPARATUS_KINDS = ['fabric', 'hoop', 'trapeze', 'hammock', 'straps', 'rope'];

/**
 * PRODUCT.md §4.7: per booked point, the apparatus that will hang for the class. Times and the
 * cancelled flag are copied from the session (as in session_points) so that "does this item hang
 * elsewhere in an overlapping class" needs no join.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('session_apparatus', (t) => {
    t.integer('session_id').notNullable().references('sessions.id').onDelete('CASCADE');
    t.integer('point_id').notNullable().references('points.id');
    t.integer('gear_id').notNullable().references('gear_items.id');
    t.string('starts_at', 30).notNullable();
    t.string('ends_at', 30).notNullable();
    t.boolean('cancelled').notNullable().defaultTo(false);
    t.primary(['session_id', 'point_id']);
    t.index(['gear_id', 'starts_at']);
  });
  // Classes booked before this table: the apparatus mounted on their point when it is of the
  // class's kind (what the booking checked then). Others get none and read as without apparatus.
  const rows = (await knex('session_points')
    .join('sessions', 'sessions.id', 'session_points.session_id')
    .join('class_types', 'class_types.id', 'sessions.class_type_id')
    .join('load_path_links', 'load_path_links.point_id', 'session_points.point_id')
    .join('gear_items', 'gear_items.id', 'load_path_links.gear_id')
    .whereIn('gear_items.kind', APPARATUS_KINDS)
    .whereRaw('gear_items.kind = class_types.apparatus')
    .select('session_points.session_id', 'session_points.point_id', 'gear_items.id as gear_id', 'session_points.starts_at', 'session_points.ends_at', 'session_points.cancelled')) as Array<Record<string, unknown>>;
  for (let i = 0; i < rows.length; i += 200) await knex('session_apparatus').insert(rows.slice(i, i + 200));
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('session_apparatus');
}
