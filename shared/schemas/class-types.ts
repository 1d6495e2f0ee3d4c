import { z } from 'zod';
import { labelText } from './common';
import { apparatusKindSchema } from './vocabulary';

/** A class type's name: as on create, so a rename is held to the same words. */
export const classTypeName = labelText(80, 'Enter a class name');

export const createClassTypeSchema = z.object({
  name: classTypeName,
  apparatus: apparatusKindSchema,
  durationMinutes: z.number().int('Whole minutes').min(15, 'At least 15 minutes').max(480, 'At most 8 hours'),
  capacity: z.number().int().min(1, 'At least one place').max(100),
  performersPerPoint: z.number().int().min(1, 'At least one performer per point').max(10),
  /** Omitted: the policy's factor for the apparatus. */
  dynamicFactor: z.number().min(1).max(20).nullable().optional(),
  /** Omitted: the policy's assumed body mass. */
  bodyMassKg: z.number().min(20).max(300).nullable().optional(),
});
export type CreateClassType = z.infer<typeof createClassTypeSchema>;

/**
 * Rename, retire (`active: false`) or bring back a class type. A retired type cannot be picked for
 * a new booking; its classes already on the calendar keep it and show its name.
 */
export const updateClassTypeSchema = z
  .object({ name: classTypeName.optional(), active: z.boolean({ message: 'Say whether the class type is in use' }).optional() })
  .strict()
  .refine((v) => v.name !== undefined || v.active !== undefined, { message: 'Nothing to change: send a new name or whether it is in use' });
export type UpdateClassType = z.infer<typeof updateClassTypeSchema>;

export const classTypeSchema = z.object({
  id: z.number(),
  name: z.string(),
  apparatus: apparatusKindSchema,
  durationMinutes: z.number(),
  capacity: z.number(),
  performersPerPoint: z.number(),
  dynamicFactor: z.number().nullable(),
  bodyMassKg: z.number().nullable(),
  active: z.boolean(),
});
export type ClassType = z.infer<typeof classTypeSchema>;
