import { z } from 'zod';

/**
 * Cursor pagination (PRODUCT.md §6, §10): lists that can grow answer `{ items, nextCursor }`,
 * newest first, keyset on the list's sort key. The cursor is opaque to callers: base64url of the
 * last row's sort key as a JSON array. The first page holds at least 100 rows unless asked fewer.
 */
export const PAGE_SIZE = 100;
export const MAX_PAGE_SIZE = 500;

type KeyPart = string | number;

const toBase64Url = (s: string) => btoa(s).replace(/\+/g, '-').replace(/\//g, '_').replace(/=+$/, '');
const fromBase64Url = (s: string) => atob(s.replace(/-/g, '+').replace(/_/g, '/'));

/**
 * The cursor for the page after a row with this sort key. Characters past ASCII (a student's name)
 * are written as JSON \u escapes first, so the text base64 encodes is ASCII and decodes the same.
 */
export function encodeCursor(key: readonly KeyPart[]): string {
  return toBase64Url(JSON.stringify(key).replace(/[\u0080-\uffff]/g, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`));
}

const BAD_CURSOR = 'This page link is not valid any more. Start again from the first page.';

/** A cursor query parameter whose decoded sort key must match `key` (a zod tuple). */
export function cursorSchema<T extends z.ZodTuple>(key: T) {
  return z
    .string()
    .max(400, BAD_CURSOR)
    .transform((s, ctx): z.infer<T> => {
      let decoded: unknown;
      try {
        if (!/^[A-Za-z0-9_-]+$/.test(s)) throw new Error('not base64url');
        decoded = JSON.parse(fromBase64Url(s));
      } catch {
        ctx.addIssue({ code: 'custom', message: BAD_CURSOR });
        return z.NEVER;
      }
      const parsed = key.safeParse(decoded);
      if (!parsed.success) {
        ctx.addIssue({ code: 'custom', message: BAD_CURSOR });
        return z.NEVER;
      }
      return parsed.data;
    });
}

export const limitSchema = z.coerce
  .number({ message: 'Ask for a number of rows' })
  .int('Ask for a whole number of rows')
  .min(1, 'Ask for at least one row')
  .max(MAX_PAGE_SIZE, `Ask for at most ${MAX_PAGE_SIZE} rows at a time`);

/** Sort keys of the paginated lists. */
export const idKey = z.tuple([z.number().int().positive()]);
export const instantIdKey = z.tuple([z.string().max(40), z.number().int().positive()]);

/** The wire shape of one page. */
export const pageSchema = <T extends z.ZodType>(item: T) => z.object({ items: z.array(item), nextCursor: z.string().nullable() });
export interface Page<T> {
  items: T[];
  nextCursor: string | null;
}
