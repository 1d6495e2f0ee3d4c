import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('rooms', (t) => {
    t.increments('id');
    t.string('name', 80).notNullable().unique();
    t.string('created_at', 30).notNullable();
  });
  await knex.schema.createTable('points', (t) => {
    t.increments('id');
    t.integer('room_id').notNullable().references('rooms.id').onDelete('RESTRICT');
    t.string('label', 40).notNullable().unique();
    t.string('structure', 20).notNullable();
    t.double('structural_rating_kn').notNullable();
    t.text('apparatus_json').notNullable().defaultTo('[]');
    t.integer('max_performers').notNullable().defaultTo(1);
    t.boolean('in_service').notNullable().defaultTo(true);
    t.text('notes');
    // The clearance state, kept on the point: the latest clearance and whether it was voided since.
    t.string('last_cleared_at', 30);
    t.string('clearance_voided_at', 30);
    t.string('created_at', 30).notNullable();
    t.string('updated_at', 30).notNullable();
    t.index(['room_id']);
  });
  await knex.schema.createTable('gear_items', (t) => {
    t.increments('id');
    t.string('kind', 30).notNullable();
    t.string('material', 20).notNullable();
    t.string('gate', 20).notNullable();
    t.string('serial', 60).notNullable().unique();
    t.string('maker', 80);
    t.string('model', 80);
    t.double('major_kn').notNullable();
    t.double('minor_kn');
    t.double('gate_open_kn');
    t.double('wll_kn');
    t.boolean('multi_directional').notNullable().defaultTo(false);
    t.string('manufactured_on', 10);
    t.string('in_service_on', 10);
    t.double('service_life_years');
    t.string('status', 20).notNullable().defaultTo('in_service');
    t.string('status_reason', 500);
    t.string('inspected_until', 30);
    t.text('notes');
    t.string('created_at', 30).notNullable();
    t.string('updated_at', 30).notNullable();
    t.index(['kind']);
    t.index(['status']);
  });
  await knex.schema.createTable('gear_events', (t) => {
    t.increments('id');
    t.integer('gear_id').notNullable().references('gear_items.id').onDelete('RESTRICT');
    t.string('kind', 20).notNullable();
    t.text('note').notNullable().defaultTo('');
    t.integer('recorded_by').references('users.id');
    t.string('recorded_at', 30).notNullable();
    t.index(['gear_id']);
  });
  await knex.schema.createTable('load_path_links', (t) => {
    t.increments('id');
    t.integer('point_id').notNullable().references('points.id').onDelete('CASCADE');
    t.integer('position').notNullable();
    // A gear item hangs in at most one load path.
    t.integer('gear_id').notNullable().unique().references('gear_items.id').onDelete('RESTRICT');
    t.string('mode', 20).notNullable();
    t.boolean('three_way').notNullable().defaultTo(false);
    t.boolean('basket_over_half').notNullable().defaultTo(false);
    t.string('leg', 1);
    t.double('included_angle_deg');
    t.unique(['point_id', 'position']);
  });
  await knex.schema.createTable('documents', (t) => {
    t.increments('id');
    t.string('owner_type', 20).notNullable();
    t.integer('owner_id').notNullable();
    t.string('kind', 20).notNullable();
    t.string('original_name', 200).notNullable();
    t.string('stored_name', 80).notNullable().unique();
    t.string('mime', 60).notNullable();
    t.integer('size').notNullable();
    t.integer('uploaded_by').references('users.id');
    t.string('uploaded_at', 30).notNullable();
    t.index(['owner_type', 'owner_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const t of ['documents', 'load_path_links', 'gear_events', 'gear_items', 'points', 'rooms']) await knex.schema.dropTable(t);
}
