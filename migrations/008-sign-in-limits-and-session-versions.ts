import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  // Moved whenever a person's sessions must end (sign-out, password reset, deactivation, role
  // change); a session cookie carries the version it was issued under and is refused once it moves.
  await knex.schema.alterTable('users', (t) => {
    t.integer('session_version').notNullable().defaultTo(1);
  });
  // Failed sign-in counters, shared by every server process on the database. `key` is a keyed
  // hash of what is counted (an account and an address, an address, an account; or an address
  // an account signed in from), so neither typed e-mails nor addresses are stored readable.
  await knex.schema.createTable('sign_in_counters', (t) => {
    t.string('key', 64).primary();
    t.integer('count').notNullable();
    // The count lapses at this instant (a fixed window from its first failure).
    t.string('expires_at', 30).notNullable();
    t.index(['expires_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('sign_in_counters');
  await knex.schema.alterTable('users', (t) => {
    t.dropColumn('session_version');
  });
}
