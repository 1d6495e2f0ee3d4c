import type { Db } from '../../db/knex';

/** The reads the student's own pages need beyond what the places and students repositories give. */
export function myRepository(db: Db) {
  return {
    /** The room each of these classes is in, by class id. */
    async roomNamesOfSessions(sessionIds: number[], trx: Db = db): Promise<Map<number, string>> {
      const rows = (await trx('sessions').join('rooms', 'rooms.id', 'sessions.room_id').whereIn('sessions.id', [...new Set(sessionIds)]).select('sessions.id as id', 'rooms.name as name')) as Array<{ id: number; name: string }>;
      return new Map(rows.map((r) => [r.id, r.name]));
    },
  };
}
export type MyRepository = ReturnType<typeof myRepository>;
