import type { Knex } from 'knex';
import { encodeCursor, PAGE_SIZE, type Page } from '../../shared/schemas/page';

export interface SortColumn {
  /** A qualified column, e.g. `inspections.inspected_at`. */
  col: string;
  dir: 'asc' | 'desc';
}

/** Orders by the sort key (which must end in a unique column) and, with a cursor, starts after it. */
export function keyset(q: Knex.QueryBuilder, sort: SortColumn[], after?: ReadonlyArray<string | number>): Knex.QueryBuilder {
  for (const s of sort) q.orderBy(s.col, s.dir);
  if (after) {
    // (a > x) OR (a = x AND b > y) OR …: portable to SQLite and PostgreSQL with mixed directions.
    q.where((w) => {
      sort.forEach((s, i) => {
        w.orWhere((and) => {
          for (let j = 0; j < i; j++) and.where(sort[j].col, after[j]);
          and.where(s.col, s.dir === 'desc' ? '<' : '>', after[i]);
        });
      });
    });
  }
  return q;
}

/** Asks for one row more than the page to know whether another page follows. */
export const pageLimit = (limit?: number) => (limit ?? PAGE_SIZE) + 1;

/** Cuts the extra row off and makes the cursor from the last row kept. */
export function cutPage<R>(rows: R[], limit: number | undefined, keyOf: (r: R) => Array<string | number>): { rows: R[]; nextCursor: string | null } {
  const size = limit ?? PAGE_SIZE;
  const more = rows.length > size;
  const kept = more ? rows.slice(0, size) : rows;
  return { rows: kept, nextCursor: more ? encodeCursor(keyOf(kept[kept.length - 1])) : null };
}

export type { Page };
