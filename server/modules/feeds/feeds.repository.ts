import type { Db } from '../../db/knex';

/** Whose feed: an instructor (a users row) or a student (a students row). */
export type FeedOwner = { userId: number } | { studentId: number };

interface FeedRow {
  id: number;
  token_hash: string;
  user_id: number | null;
  student_id: number | null;
  created_at: string;
  revoked_at: string | null;
}

/** A student's booking in a class, as their calendar feed shows it. */
export interface FeedPlace {
  placeId: number;
  status: 'booked' | 'waitlisted' | 'attended';
  sessionId: number;
  startsAt: string;
  endsAt: string;
  cancelled: boolean;
  className: string;
  roomName: string;
  pointLabel: string | null;
}

const ownerWhere = (owner: FeedOwner) => ('userId' in owner ? { user_id: owner.userId } : { student_id: owner.studentId });

export function feedsRepository(db: Db) {
  return {
    async active(owner: FeedOwner, trx: Db = db): Promise<{ id: number; createdAt: string } | null> {
      const row = await trx<FeedRow>('calendar_feeds').where(ownerWhere(owner)).whereNull('revoked_at').orderBy('id', 'desc').first();
      return row ? { id: row.id, createdAt: row.created_at } : null;
    },
    async revokeAll(owner: FeedOwner, at: Date, trx: Db = db): Promise<number> {
      return trx('calendar_feeds').where(ownerWhere(owner)).whereNull('revoked_at').update({ revoked_at: at.toISOString() });
    },
    async insert(owner: FeedOwner, tokenHash: string, at: Date, trx: Db = db): Promise<void> {
      await trx('calendar_feeds').insert({ token_hash: tokenHash, ...('userId' in owner ? { user_id: owner.userId } : { student_id: owner.studentId }), created_at: at.toISOString() });
    },
    /**
     * The student's places that are booked, waitlisted or attended in classes overlapping
     * [from, to), cancelled classes included, by start then booking.
     */
    async studentPlacesBetween(studentId: number, from: string, to: string, trx: Db = db): Promise<FeedPlace[]> {
      const rows = (await trx('places as pl')
        .join('sessions as s', 's.id', 'pl.session_id')
        .join('class_types as ct', 'ct.id', 's.class_type_id')
        .join('rooms as r', 'r.id', 's.room_id')
        .leftJoin('points as p', 'p.id', 'pl.point_id')
        .where('pl.student_id', studentId)
        .whereIn('pl.status', ['booked', 'waitlisted', 'attended'])
        .andWhere('s.ends_at', '>', from)
        .andWhere('s.starts_at', '<', to)
        .orderBy('s.starts_at')
        .orderBy('pl.id')
        .select('pl.id as placeId', 'pl.status as status', 's.id as sessionId', 's.starts_at as startsAt', 's.ends_at as endsAt', 's.cancelled as cancelled', 'ct.name as className', 'r.name as roomName', 'p.label as pointLabel')) as Array<Omit<FeedPlace, 'cancelled'> & { cancelled: number | boolean }>;
      return rows.map((r) => ({ ...r, cancelled: Boolean(r.cancelled) }));
    },
    /** The live feed a token's hash names, if any. */
    async byHash(tokenHash: string): Promise<FeedOwner | null> {
      const row = await db<FeedRow>('calendar_feeds').where({ token_hash: tokenHash }).whereNull('revoked_at').first();
      if (!row) return null;
      return row.user_id !== null ? { userId: row.user_id } : row.student_id !== null ? { studentId: row.student_id } : null;
    },
  };
}
export type FeedsRepository = ReturnType<typeof feedsRepository>;
