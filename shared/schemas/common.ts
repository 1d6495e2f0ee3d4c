import { z } from 'zod';

export const idSchema = z.coerce.number({ message: 'Must be a number' }).int('Must be a whole number').positive('Must be a positive id').max(2 ** 31 - 1, 'Id is too large');
export const idParams = z.object({ id: idSchema });
/** An ISO 8601 instant with an offset (or Z), as the wire carries it. */
export const instantSchema = z.iso.datetime({ offset: true, message: 'Use an ISO 8601 time with its offset, e.g. 2026-12-01T18:00:00Z' });
export const dateSchema = z.iso.date({ message: 'Use a date as YYYY-MM-DD' });

export const errorSchema = z.object({
  error: z.object({ code: z.string(), message: z.string(), details: z.unknown().optional() }),
});
export type ApiErrorBody = z.infer<typeof errorSchema>;
