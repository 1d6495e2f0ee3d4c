import type { Knex } from 'knex';
import * as m001 from './001-staff-and-studio';
import * as m002 from './002-rig-register';
import * as m003 from './003-inspections-faults-audit';
import * as m004 from './004-schedule';
import * as m005 from './005-outbox';
import * as m006 from './006-session-apparatus';
import * as m007 from './007-records-that-hold';
import * as m008 from './008-sign-in-limits-and-session-versions';
import * as m010 from './010-inspection-status';
import * as m012 from './012-idempotency-keys';
import * as m013 from './013-data-versions';
import * as m014 from './014-students-and-places';
import * as m015 from './015-student-sign-in-and-feeds';
import * as m017 from './017-cold-path-indexes';

/**
 * Static list of migrations, append-only. A static source loads the same under vitest, tsx and
 * the built server (a folder of raw .ts files does not).
 */
const migrations: Record<string, Knex.Migration> = {
  '001-staff-and-studio': m001,
  '002-rig-register': m002,
  '003-inspections-faults-audit': m003,
  '004-schedule': m004,
  '005-outbox': m005,
  '006-session-apparatus': m006,
  '007-records-that-hold': m007,
  '008-sign-in-limits-and-session-versions': m008,
  '010-inspection-status': m010,
  '012-idempotency-keys': m012,
  '013-data-versions': m013,
  '014-students-and-places': m014,
  '015-student-sign-in-and-feeds': m015,
  '017-cold-path-indexes': m017,
};

export const migrationSource: Knex.MigrationSource<string> = {
  getMigrations: async () => Object.keys(migrations),
  getMigrationName: (name) => name,
  getMigration: async (name) => migrations[name],
};
