import { z } from 'zod';
import { labelProblem, normaliseLabel } from '../text/labels';

export const idSchema = z.coerce.number({ message: 'Must be a number' }).int('Must be a whole number').positive('Must be a positive id').max(2 ** 31 - 1, 'Id is too large');
export const idParams = z.object({ id: idSchema });
/** An ISO 8601 instant with an offset (or Z), as the wire carries it. */
export const instantSchema = z.iso.datetime({ offset: true, message: 'Use an ISO 8601 time with its offset, e.g. 2026-12-01T18:00:00Z' });
export const dateSchema = z.iso.date({ message: 'Use a date as YYYY-MM-DD' });

export const errorSchema = z.object({
  error: z.object({ code: z.string(), message: z.string(), details: z.unknown().optional() }),
});
export type ApiErrorBody = z.infer<typeof errorSchema>;

/**
 * A label, name or serial (shared/text/labels.ts): invisible and text-direction characters refused
 * with a field message, then stored in NFKC with single spaces. `required` is the message for an
 * empty value; without it the text may be empty.
 */
export function labelText(max: number, required?: string) {
  return z
    .string()
    .superRefine((v, ctx) => {
      const problem = labelProblem(v);
      if (problem) ctx.addIssue({ code: 'custom', message: problem });
    })
    .transform(normaliseLabel)
    .pipe(required ? z.string().min(1, required).max(max, `Keep it under ${max} characters`) : z.string().max(max, `Keep it under ${max} characters`));
}
