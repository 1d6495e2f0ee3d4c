import type { Knex } from 'knex';
import { appendOnly } from '../server/db/dialect';

/**
 * PRODUCT.md §10, records that hold:
 * - `clearance_voids`: one row per voided clearance (an inspection that cleared its point), so a
 *   point's clearance state is derived from append-only rows (cleared inspections and voids)
 *   rather than from the editable columns on `points`, which stay as a cache the audit check
 *   compares with the rows.
 * - `session_records`: each booked point's status, reasons and hanging apparatus as the class
 *   started, kept once and never rewritten.
 * Both refuse updates and deletes, like migration 003's tables.
 *
 * The audit chain is not re-keyed here: its key lives outside the database, so the server does it
 * at its first start with the key (server/modules/audit/chain-upgrade.ts).
 */

const NOT_RECORDED_REASON = {
  code: 'not_recorded',
  message: 'No record was kept when this class started: it began before Loftwise kept each class’s record at its start.',
};

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('clearance_voids', (t) => {
    t.increments('id');
    t.integer('point_id').notNullable().references('points.id');
    // The clearance voided: at most one void per clearance.
    t.integer('inspection_id').notNullable().unique().references('inspections.id');
    t.string('at', 30).notNullable();
    t.string('reason', 40).notNullable();
    t.string('source', 200).notNullable().defaultTo('');
    t.index(['point_id']);
  });
  await knex.schema.createTable('session_records', (t) => {
    t.increments('id');
    t.integer('session_id').notNullable().references('sessions.id');
    t.integer('point_id').notNullable().references('points.id');
    t.string('point_label', 40).notNullable();
    // The start the record was kept for.
    t.string('starts_at', 30).notNullable();
    // cleared | expiring | blocked | not_recorded
    t.string('status', 20).notNullable();
    t.string('cleared_until', 30);
    t.text('reasons_json').notNullable().defaultTo('[]');
    // The apparatus hanging at the start: { gearId, kind, serial } or null.
    t.text('apparatus_json');
    t.string('recorded_at', 30).notNullable();
    // One record per booked point per start: a class moved after it began keeps the first start's.
    t.unique(['session_id', 'starts_at', 'point_id']);
    t.index(['point_id', 'starts_at']);
  });
  // Through the dialect adapter: on SQLite the same triggers as ever, on PostgreSQL their PL/pgSQL twins.
  for (const table of ['clearance_voids', 'session_records']) await appendOnly(knex, table);
  // PRODUCT.md §4.9: the point's own clearance end, worked out when the rigger signs and kept with
  // the clearance (before the mounted apparatus's cap, which follows that apparatus's own
  // inspection). `cleared_until` keeps what the rigger was told, capped. Null on older rows: the
  // policy alone decides for them. Adding a column touches no row, so the append-only triggers stand.
  await knex.schema.alterTable('inspections', (t) => t.string('clearance_end', 30));
  // The clearances of a point, newest first, for deriving its clearance.
  await knex.schema.alterTable('inspections', (t) => t.index(['point_id', 'cleared', 'inspected_at'], 'inspections_point_cleared_at'));

  // Points voided today: a void row for their latest clearance, at the time the column says.
  const voided = (await knex('points').whereNotNull('clearance_voided_at').select('id', 'clearance_voided_at')) as Array<{ id: number; clearance_voided_at: string }>;
  for (const p of voided) {
    const latest = await knex('inspections').where({ point_id: p.id, kind: 'periodic' }).where('cleared', true).orderBy([{ column: 'inspected_at', order: 'desc' }, { column: 'id', order: 'desc' }]).first('id');
    if (latest) await knex('clearance_voids').insert({ point_id: p.id, inspection_id: latest.id, at: p.clearance_voided_at, reason: 'voided_before_records', source: 'points.clearance_voided_at, carried over by migration 007' }).onConflict('inspection_id').ignore();
  }

  // Classes that began before records were kept: say so, rather than ever show them with a later status.
  const now = new Date().toISOString();
  const started = (await knex('session_points').join('points', 'points.id', 'session_points.point_id').join('sessions', 'sessions.id', 'session_points.session_id').where('sessions.starts_at', '<=', now).select('session_points.session_id', 'session_points.point_id', 'points.label', 'sessions.starts_at')) as Array<{ session_id: number; point_id: number; label: string; starts_at: string }>;
  for (let i = 0; i < started.length; i += 200) {
    await knex('session_records').insert(
      started.slice(i, i + 200).map((r) => ({ session_id: r.session_id, point_id: r.point_id, point_label: r.label, starts_at: r.starts_at, status: 'not_recorded', cleared_until: null, reasons_json: JSON.stringify([NOT_RECORDED_REASON]), apparatus_json: null, recorded_at: now })),
    );
  }
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('inspections', (t) => t.dropIndex(['point_id', 'cleared', 'inspected_at'], 'inspections_point_cleared_at'));
  await knex.schema.alterTable('inspections', (t) => t.dropColumn('clearance_end'));
  await knex.schema.dropTable('session_records');
  await knex.schema.dropTable('clearance_voids');
}
