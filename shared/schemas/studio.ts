import { z } from 'zod';
import { policySchema } from './policy';

export function isTimeZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}

const strictPolicy = policySchema.extend({
  timeZone: z.string().refine(isTimeZone, 'Pick a time zone such as Europe/London'),
});

export const studioSchema = z.object({ name: z.string(), policy: policySchema });
export type Studio = z.infer<typeof studioSchema>;

export const updateStudioSchema = z
  .object({
    name: z.string().trim().min(1, 'Enter the studio name').max(120).optional(),
    policy: strictPolicy.optional(),
  })
  .strict();
export type UpdateStudio = z.infer<typeof updateStudioSchema>;
