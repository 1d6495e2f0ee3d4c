import type { Knex } from 'knex';
import { dropTrigger, refuseInsertWhen } from '../server/db/dialect';

/**
 * Students sign in (PRODUCT.md §11): a `users` row of role `student` linked to its `students` row,
 * Auth.js's e-mail verification tokens, and private calendar feeds for instructors and students.
 */
export async function up(knex: Knex): Promise<void> {
  // Added by plain SQL that both databases accept (a nullable column referencing students): knex's
  // alterTable with a foreign key would rebuild the users table on SQLite, triggers and all.
  await knex.raw('ALTER TABLE users ADD COLUMN student_id integer NULL REFERENCES students (id)');
  await knex.raw('CREATE UNIQUE INDEX users_student_id_unique ON users (student_id)');
  await dropTrigger(knex, 'users', 'users_role_check');
  await refuseInsertWhen(knex, 'users_role_check', 'users', "NEW.role NOT IN ('owner','reception','instructor','rigger','student')", 'invalid role');

  // Auth.js's e-mail sign-in: the token column holds Auth.js's hash of the token (sha-256 of the
  // token and the secret), never the token in the link.
  await knex.schema.createTable('verification_tokens', (t) => {
    t.string('identifier', 254).notNullable();
    t.string('token', 128).notNullable();
    t.string('expires', 30).notNullable();
    t.primary(['identifier', 'token']);
    t.index(['expires']);
  });

  // A private feed URL (/ical/<token>.ics): only the sha-256 of the token is kept. One of user_id
  // (an instructor) or student_id (a student) names whose classes it lists.
  await knex.schema.createTable('calendar_feeds', (t) => {
    t.increments('id');
    t.string('token_hash', 64).notNullable().unique();
    t.integer('user_id').nullable().references('id').inTable('users');
    t.integer('student_id').nullable().references('id').inTable('students');
    t.string('created_at', 30).notNullable();
    t.string('revoked_at', 30).nullable();
    t.index(['user_id']);
    t.index(['student_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('calendar_feeds');
  await knex.schema.dropTable('verification_tokens');
  await dropTrigger(knex, 'users', 'users_role_check');
  await refuseInsertWhen(knex, 'users_role_check', 'users', "NEW.role NOT IN ('owner','reception','instructor','rigger')", 'invalid role');
  await knex.raw('DROP INDEX users_student_id_unique');
  await knex.schema.alterTable('users', (t) => t.dropColumn('student_id'));
}
