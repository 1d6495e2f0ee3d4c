import type { Knex } from 'knex';

/**
 * Students and their places (PRODUCT.md §11). A place is one performer slot on one booked point;
 * a student is never deleted (a duplicate is merged into the kept one and marked).
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('students', (t) => {
    t.increments('id');
    t.string('name', 120).notNullable();
    t.string('email', 254).notNullable();
    // The address as lookups compare it: NFKC, trimmed, lower case (shared/schemas/students.ts).
    t.string('email_key', 254).notNullable();
    t.string('phone', 40);
    t.string('emergency_name', 120);
    t.string('emergency_phone', 40);
    t.integer('merged_into_id').references('students.id');
    t.string('created_at', 30).notNullable();
    t.string('updated_at', 30).notNullable();
    t.index(['name', 'id']);
    t.index(['merged_into_id']);
  });
  // One live student per address; merged duplicates keep theirs. Partial indexes read the same on
  // SQLite and PostgreSQL.
  await knex.raw('CREATE UNIQUE INDEX students_email_key_live ON students (email_key) WHERE merged_into_id IS NULL');

  await knex.schema.createTable('waiver_versions', (t) => {
    t.increments('id');
    t.integer('version').notNullable().unique();
    t.text('text').notNullable();
    t.integer('created_by').notNullable().references('users.id');
    t.string('created_at', 30).notNullable();
  });

  await knex.schema.createTable('waiver_acceptances', (t) => {
    t.increments('id');
    t.integer('student_id').notNullable().references('students.id');
    t.integer('waiver_version_id').notNullable().references('waiver_versions.id');
    t.string('full_name', 120).notNullable();
    t.string('method', 10).notNullable(); // online | paper
    t.integer('recorded_by').references('users.id');
    t.string('accepted_at', 30).notNullable();
    t.string('valid_until', 30).notNullable();
    t.index(['student_id', 'valid_until']);
  });

  await knex.schema.createTable('places', (t) => {
    t.increments('id');
    t.integer('session_id').notNullable().references('sessions.id');
    t.integer('student_id').notNullable().references('students.id');
    // Null while waitlisted, or when the point was lost and no fit place is left.
    t.integer('point_id').references('points.id');
    t.string('status', 12).notNullable(); // booked | waitlisted | cancelled | attended | no_show
    t.string('waitlisted_at', 30);
    t.integer('booked_by').references('users.id');
    t.string('cancelled_at', 30);
    t.string('checked_in_at', 30);
    t.string('created_at', 30).notNullable();
    t.string('updated_at', 30).notNullable();
    t.index(['session_id', 'status']);
    t.index(['student_id', 'session_id']);
  });
  // At most one place per student and class that is not cancelled (a booking twice is refused).
  await knex.raw("CREATE UNIQUE INDEX places_one_live_per_student ON places (session_id, student_id) WHERE status <> 'cancelled'");
}

export async function down(knex: Knex): Promise<void> {
  for (const t of ['places', 'waiver_acceptances', 'waiver_versions', 'students']) await knex.schema.dropTable(t);
}
