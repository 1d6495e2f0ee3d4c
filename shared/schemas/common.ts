import { z } from 'zod';
import { labelProblem, normaliseLabel } from '../text/labels';

/**
 * Every field message in the product's words, on both sides (this module loads with every schema):
 * a schema's own message wins; anything it does not word reads like this, never like zod's
 * defaults ("Too small: expected number to be >=1").
 */
function productMessage(iss: z.core.$ZodRawIssue): string | undefined {
  const what = (origin: unknown) => (origin === 'array' || origin === 'set' ? 'items' : 'characters');
  switch (iss.code) {
    case 'invalid_type':
      if (iss.input === undefined || iss.input === null || iss.input === '') return 'Required';
      return iss.expected === 'number' || iss.expected === 'int' ? 'Enter a number' : iss.expected === 'boolean' ? 'Choose yes or no' : 'Check this value';
    case 'too_small': {
      const min = Number(iss.minimum);
      if (iss.origin === 'number' || iss.origin === 'bigint') return iss.inclusive === false ? `Must be more than ${min}` : `Must be ${min} or more`;
      if (iss.origin === 'date') return 'Pick a later date';
      if (iss.origin === 'string' && min <= 1) return 'Required';
      return `At least ${min} ${what(iss.origin)}`;
    }
    case 'too_big': {
      const max = Number(iss.maximum);
      if (iss.origin === 'number' || iss.origin === 'bigint') return iss.inclusive === false ? `Must be less than ${max}` : `Must be ${max} or less`;
      if (iss.origin === 'date') return 'Pick an earlier date';
      return `At most ${max} ${what(iss.origin)}`;
    }
    case 'invalid_format':
      if (iss.format === 'email') return 'Enter an e-mail address, like name@example.com';
      if (iss.format === 'date') return 'Enter a date';
      if (iss.format === 'datetime') return 'Enter a date and time';
      if (iss.format === 'url') return 'Enter a web address';
      return 'Check the format';
    case 'not_multiple_of':
      return `Use steps of ${String(iss.divisor)}`;
    case 'invalid_value':
      return 'Pick one of the options';
    case 'unrecognized_keys':
      return `Not expected here: ${iss.keys.join(', ')}`;
    case 'invalid_union':
    case 'invalid_key':
    case 'invalid_element':
    case 'custom':
      return 'Check this value';
    default:
      return undefined;
  }
}
z.config({ customError: productMessage });

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
