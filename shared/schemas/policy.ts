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
  bodyMassKg: z.number().min(20).max(300),
  dynamicFactors: z.object({
    fabric: z.number().min(1).max(20),
    hammock: z.number().min(1).max(20),
    hoop: z.number().min(1).max(20),
    rope: z.number().min(1).max(20),
    straps: z.number().min(1).max(20),
    trapeze: z.number().min(1).max(20),
  }),
  reminderLeadHours: z.array(z.number().min(0.25).max(24 * 14)).max(6),
});
export type Policy = z.infer<typeof policySchema>;

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
};
