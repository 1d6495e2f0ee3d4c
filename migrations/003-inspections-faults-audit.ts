import type { Knex } from 'knex';
import { appendOnly } from '../server/db/dialect';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('inspections', (t) => {
    t.increments('id');
    t.string('kind', 20).notNullable(); // pre_use | periodic | after_incident
    t.integer('point_id').references('points.id');
    t.integer('gear_id').references('gear_items.id');
    t.integer('inspector_id').notNullable().references('users.id');
    t.string('inspected_at', 30).notNullable();
    t.string('studio_day', 10).notNullable();
    t.string('result', 20).notNullable(); // pass | attention | fail
    t.text('notes').notNullable().defaultTo('');
    t.boolean('cleared').notNullable().defaultTo(false);
    t.string('cleared_until', 30);
    t.index(['point_id', 'kind', 'inspected_at']);
    t.index(['gear_id', 'inspected_at']);
    t.index(['inspected_at']);
  });
  await knex.schema.createTable('inspection_items', (t) => {
    t.increments('id');
    t.integer('inspection_id').notNullable().references('inspections.id');
    t.string('key', 60).notNullable();
    t.string('label', 300).notNullable();
    t.string('result', 20).notNullable();
    t.text('note').notNullable().defaultTo('');
    t.integer('gear_id').references('gear_items.id');
    t.index(['inspection_id']);
  });
  await knex.schema.createTable('faults', (t) => {
    t.increments('id');
    t.integer('point_id').references('points.id');
    t.integer('gear_id').references('gear_items.id');
    t.string('severity', 10).notNullable();
    t.text('description').notNullable();
    t.string('status', 10).notNullable().defaultTo('open');
    t.integer('reported_by').notNullable().references('users.id');
    t.string('reported_at', 30).notNullable();
    t.integer('source_inspection_id').references('inspections.id');
    t.string('resolution', 20);
    t.text('resolution_note');
    t.integer('resolved_by').references('users.id');
    t.string('resolved_at', 30);
    t.index(['status']);
    t.index(['point_id', 'status']);
    t.index(['gear_id', 'status']);
  });
  await knex.schema.createTable('audit_entries', (t) => {
    t.increments('id');
    t.string('at', 30).notNullable();
    t.integer('actor_id').references('users.id');
    t.string('action', 60).notNullable();
    t.string('entity', 30).notNullable();
    t.integer('entity_id');
    t.text('before_json');
    t.text('after_json');
    t.string('prev_hash', 64).notNullable();
    t.string('hash', 64).notNullable();
  });
  // Through the dialect adapter: on SQLite the same triggers as ever, on PostgreSQL their PL/pgSQL twins.
  for (const table of ['audit_entries', 'inspections', 'inspection_items']) await appendOnly(knex, table);
}

export async function down(knex: Knex): Promise<void> {
  for (const t of ['audit_entries', 'faults', 'inspection_items', 'inspections']) await knex.schema.dropTable(t);
}
