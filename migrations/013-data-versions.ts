import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  // One counter moved by triggers on every table a kept answer reads (installed after each
  // migrate by server/db/dialect.ts), so every process sees any commit on its next request.
  await knex.schema.createTable('data_versions', (t) => {
    t.integer('id').primary();
    t.bigInteger('version').notNullable();
  });
  await knex('data_versions').insert({ id: 1, version: 1 });
  // The mail worker's lease: whichever process holds an unexpired row runs the worker.
  await knex.schema.createTable('worker_leases', (t) => {
    t.string('name', 40).primary();
    t.string('holder', 120).notNullable();
    t.string('expires_at', 30).notNullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('worker_leases');
  await knex.schema.dropTable('data_versions');
}
