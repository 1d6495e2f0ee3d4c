import type { Knex } from 'knex';
import { refuseInsertWhen } from '../server/db/dialect';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('users', (t) => {
    t.increments('id');
    t.string('email', 254).notNullable().unique();
    t.string('name', 120).notNullable();
    t.string('role', 20).notNullable();
    t.string('password_hash', 255).notNullable();
    t.boolean('active').notNullable().defaultTo(true);
    t.boolean('digest_opt_out').notNullable().defaultTo(false);
    t.string('created_at', 30).notNullable();
    t.string('updated_at', 30).notNullable();
  });
  // Through the dialect adapter: on SQLite the same trigger as ever, on PostgreSQL its PL/pgSQL twin.
  await refuseInsertWhen(knex, 'users_role_check', 'users', "NEW.role NOT IN ('owner','reception','instructor','rigger')", 'invalid role');
  await knex.schema.createTable('studios', (t) => {
    t.integer('id').primary();
    t.string('name', 120).notNullable();
    t.text('policy_json').notNullable();
    t.string('updated_at', 30).notNullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('studios');
  await knex.schema.dropTable('users');
}
