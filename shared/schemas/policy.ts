import { z } from 'zod';
import { unitSchema } from './vocabulary';

/**
 * Studio policy (PRODUCT.md §7). Defaults and their sources: ../shared/CHECK-VALUES.md.
 * Every field that has no published source is a studio choice, and the UI says so.
 */
export const policySchema = z.object({
  timeZone: z.string().min(1),
  units: unitSchema,
  intervalDays: z.object({
    textile: z.number().int().min(1).max(3650),
    hardware: z.number().int().min(1).max(3650),
    structure: z.number().int().min(1).max(3650),
  }),
  warningDays: z.number().int().min(0).max(365),
  requiredFactor: z.number().min(1).max(50),
  /** Why the studio accepts a required factor below 5; kept with the policy, shown beside the factor on every load check. */
  requiredFactorReason: z.string().trim().max(500, 'Keep the reason under 500 characters').nullable().optional(),
  bodyMassKg: z.number().min(20).max(300),
  dynamicFactors: z.object({
    fabric: z.number().min(1).max(20),
    hammock: z.number().min(1).max(20),
    hoop: z.number().min(1).max(20),
    rope: z.number().min(1).max(20),
    straps: z.number().min(1).max(20),
    trapeze: z.number().min(1).max(20),
  }),
  reminderLeadHours: z
    .array(z.number().min(0.25, 'Each reminder at least 0.25 hours (15 minutes) before class').max(24 * 14, 'Each reminder at most 336 hours (14 days) before class'))
    .max(6, 'At most 6 reminders'),
  /** How long a signed waiver holds, in months (PRODUCT.md §11). */
  waiverValidMonths: z.number().int().min(1, 'At least one month').max(120, 'At most 120 months'),
  /** How many hours before class a student may still cancel their own place. */
  studentCancelCutoffHours: z.number().min(0, 'Zero hours or more (0: up to the start of the class)').max(24 * 14, 'At most 336 hours (14 days) before class'),
});
export type Policy = z.infer<typeof policySchema>;

/**
 * Below this required factor the owner must type a reason: 5 is the studio default and the design
 * factor of lifting hardware [published: ASME B30.26 §26-1.2, via mirrors].
 */
export const FACTOR_NEEDS_REASON_BELOW = 5;

/** The reason a policy's required factor needs, if any; null when the factor is at least 5. */
export function requiredFactorReasonOf(policy: Pick<Policy, 'requiredFactor' | 'requiredFactorReason'>): string | null {
  return policy.requiredFactor < FACTOR_NEEDS_REASON_BELOW ? (policy.requiredFactorReason ?? '').trim() || null : null;
}

/** A required factor below 5 is never taken silently: it needs a typed reason, next to the field. */
export function requireFactorReason(policy: Pick<Policy, 'requiredFactor' | 'requiredFactorReason'>, ctx: z.RefinementCtx): void {
  if (policy.requiredFactor < FACTOR_NEEDS_REASON_BELOW && !(policy.requiredFactorReason ?? '').trim()) {
    ctx.addIssue({
      code: 'custom',
      path: ['requiredFactorReason'],
      message: `A required factor below ${FACTOR_NEEDS_REASON_BELOW} needs a reason: say why the studio accepts a smaller margin`,
    });
  }
}

export const defaultPolicy: Policy = {
  timeZone: 'Europe/London',
  units: 'kN',
  // [studio choice] textiles 30 d, hardware and wire rope 90 d, structure 365 d.
  intervalDays: { textile: 30, hardware: 90, structure: 365 },
  // [studio choice] warning window 7 days.
  warningDays: 7,
  // [studio choice] chain strength at least 5 × the peak dynamic load.
  requiredFactor: 5,
  // [studio choice] assumed body mass 90 kg.
  bodyMassKg: 90,
  // [studio choice on published figures: Cossin, Bergeron-Parenteau & Ross (2022)]
  dynamicFactors: { fabric: 5.6, hammock: 5.6, hoop: 4.8, rope: 7.3, straps: 7.3, trapeze: 6.8 },
  // [studio choice] reminders 24 h and 2 h before class.
  reminderLeadHours: [24, 2],
  // [studio choice] a waiver holds 12 months.
  waiverValidMonths: 12,
  // [studio choice] students cancel up to 12 h before class.
  studentCancelCutoffHours: 12,
};
