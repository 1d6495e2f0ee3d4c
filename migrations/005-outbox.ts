import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('outbox_messages', (t) => {
    t.increments('id');
    t.string('kind', 30).notNullable(); // reminder | at_risk | session_change | digest
    // At most once per key: every enqueue is an insert that ignores a clash on this column.
    t.string('unique_key', 200).notNullable().unique();
    t.text('recipients_json').notNullable();
    t.string('subject', 300).notNullable();
    t.text('text_body').notNullable();
    t.text('html_body').notNullable();
    // queued | sending | sent | failed | skipped (recorded, never to be sent)
    t.string('state', 10).notNullable().defaultTo('queued');
    t.integer('attempts').notNullable().defaultTo(0);
    t.string('next_attempt_at', 30).notNullable();
    // While `sending`: when the claim lapses and the row may be tried again (a crash mid-send).
    t.string('lease_until', 30);
    t.text('last_error');
    // The session a reminder or alert is about and the start it was written for, so that a queued
    // one is dropped rather than sent once the session has moved, been cancelled or begun.
    t.integer('session_id');
    t.string('session_starts_at', 30);
    t.string('created_at', 30).notNullable();
    t.string('sent_at', 30);
    t.index(['state', 'next_attempt_at']);
    t.index(['session_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('outbox_messages');
}
