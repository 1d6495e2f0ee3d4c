import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('class_types', (t) => {
    t.increments('id');
    t.string('name', 80).notNullable().unique();
    t.string('apparatus', 20).notNullable();
    t.integer('duration_minutes').notNullable();
    t.integer('capacity').notNullable();
    t.integer('performers_per_point').notNullable().defaultTo(1);
    // Null: the policy's factor for the apparatus; body mass null: the policy's.
    t.double('dynamic_factor');
    t.double('body_mass_kg');
    t.boolean('active').notNullable().defaultTo(true);
    t.string('created_at', 30).notNullable();
  });
  await knex.schema.createTable('series', (t) => {
    t.increments('id');
    t.string('rrule', 500).notNullable();
    t.string('created_at', 30).notNullable();
  });
  await knex.schema.createTable('sessions', (t) => {
    t.increments('id');
    t.integer('class_type_id').notNullable().references('class_types.id');
    t.integer('instructor_id').notNullable().references('users.id');
    t.integer('room_id').notNullable().references('rooms.id');
    t.string('starts_at', 30).notNullable();
    t.string('ends_at', 30).notNullable();
    t.integer('series_id').references('series.id');
    t.string('occurrence_start', 30);
    t.boolean('cancelled').notNullable().defaultTo(false);
    t.string('cancel_reason', 500);
    t.boolean('at_risk').notNullable().defaultTo(false);
    t.string('created_at', 30).notNullable();
    t.string('updated_at', 30).notNullable();
    t.index(['starts_at']);
    t.index(['ends_at']);
    t.index(['instructor_id', 'starts_at']);
    t.index(['series_id']);
  });
  await knex.schema.createTable('session_points', (t) => {
    t.integer('session_id').notNullable().references('sessions.id').onDelete('CASCADE');
    t.integer('point_id').notNullable().references('points.id');
    // Copied from the session so overlap checks per point need no join.
    t.string('starts_at', 30).notNullable();
    t.string('ends_at', 30).notNullable();
    t.boolean('cancelled').notNullable().defaultTo(false);
    t.primary(['session_id', 'point_id']);
    t.index(['point_id', 'starts_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const t of ['session_points', 'sessions', 'series', 'class_types']) await knex.schema.dropTable(t);
}
