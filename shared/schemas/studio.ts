import { z } from 'zod';
import { policySchema, requireFactorReason } from './policy';

export function isTimeZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}

/** A policy as the owner may set it, before the checks across its fields (extend this one). */
export const strictPolicyFields = policySchema.extend({
  timeZone: z.string().refine(isTimeZone, 'Pick a time zone such as Europe/London'),
});
/** A policy as the owner may set it: a required factor below 5 comes with a typed reason. */
export const strictPolicySchema = strictPolicyFields.superRefine(requireFactorReason);

export const studioSchema = z.object({ name: z.string(), policy: policySchema });
export type Studio = z.infer<typeof studioSchema>;

export const updateStudioSchema = z
  .object({
    name: z.string().trim().min(1, 'Enter the studio name').max(120).optional(),
    policy: strictPolicySchema.optional(),
  })
  .strict();
export type UpdateStudio = z.infer<typeof updateStudioSchema>;

/** What a proposed policy would change now: `POST /api/studio/policy/preview`. */
export const policyPreviewBodySchema = z.object({ policy: strictPolicySchema }).strict();
export type PolicyPreviewBody = z.infer<typeof policyPreviewBodySchema>;

const statusWord = z.enum(['cleared', 'expiring', 'blocked']);
export const policyPreviewSchema = z.object({
  /** Points whose status or clearance end changes now. */
  points: z.array(
    z.object({
      pointId: z.number(),
      label: z.string(),
      roomName: z.string(),
      before: z.object({ status: statusWord, clearedUntil: z.string().nullable() }),
      after: z.object({ status: statusWord, clearedUntil: z.string().nullable(), reasons: z.array(z.object({ code: z.string(), message: z.string() })) }),
    }),
  ),
  /** Booked, future classes whose load check passes now and would fail under the proposal. */
  sessions: z.array(
    z.object({
      sessionId: z.number(),
      className: z.string(),
      startsAt: z.string(),
      pointId: z.number(),
      label: z.string(),
      achievedFactor: z.number().nullable(),
      requiredFactor: z.number(),
      violations: z.array(z.object({ code: z.string(), message: z.string() })),
    }),
  ),
  /** How many points and booked classes were looked at. */
  checked: z.object({ points: z.number(), sessions: z.number() }),
});
export type PolicyPreview = z.infer<typeof policyPreviewSchema>;
