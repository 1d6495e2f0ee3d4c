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
    /** The live feed a token's hash names, if any. */
    async byHash(tokenHash: string): Promise<FeedOwner | null> {
      const row = await db<FeedRow>('calendar_feeds').where({ token_hash: tokenHash }).whereNull('revoked_at').first();
      if (!row) return null;
      return row.user_id !== null ? { userId: row.user_id } : row.student_id !== null ? { studentId: row.student_id } : null;
    },
  };
}
export type FeedsRepository = ReturnType<typeof feedsRepository>;
