import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  // A create the client may send twice (a double click, a retry after a lost answer) carries a
  // key; the first success is kept here so a repeat answers the same result instead of booking again.
  await knex.schema.createTable('idempotency_keys', (t) => {
    t.string('key', 100).notNullable();
    t.string('route', 60).notNullable();
    t.integer('actor_id').notNullable().references('id').inTable('users');
    // A hash of the request without its key: the same key with another request is refused.
    t.string('request_hash', 64).notNullable();
    t.text('result_json').notNullable();
    t.string('created_at', 30).notNullable();
    t.primary(['route', 'key']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('idempotency_keys');
}
