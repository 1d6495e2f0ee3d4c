import { z } from 'zod';
import { idSchema, instantSchema } from './common';
import { faultResolutionSchema, inspectionResultSchema, severitySchema } from './vocabulary';
import { pointStatusSchema, reasonSchema } from './rig';

const note = z.string().trim().max(2000, 'Keep notes under 2,000 characters');

export const checklistSchema = z.object({ items: z.array(z.object({ key: z.string(), label: z.string(), gearId: z.number().optional() })) });
export type Checklist = z.infer<typeof checklistSchema>;

export const clearanceBodySchema = z.object({
  items: z.array(z.object({ key: z.string().min(1).max(60), result: inspectionResultSchema, note: note.optional() })).min(1, 'Record a result for every item').max(60),
  notes: note.optional(),
});
export type ClearanceBody = z.infer<typeof clearanceBodySchema>;

export const clearanceResultSchema = z.object({
  inspectionId: z.number(),
  cleared: z.boolean(),
  clearedUntil: z.string().nullable(),
  reasons: z.array(reasonSchema),
  faultIds: z.array(z.number()),
  status: pointStatusSchema,
});
export type ClearanceResult = z.infer<typeof clearanceResultSchema>;

export const gearInspectionBodySchema = z.object({ kind: z.enum(['periodic', 'after_incident']), result: inspectionResultSchema, note: note.optional() });
export type GearInspectionBody = z.infer<typeof gearInspectionBodySchema>;

export const preuseBodySchema = z.object({
  items: z.array(z.object({ key: z.string().min(1).max(60), result: z.enum(['pass', 'fail']), note: note.optional() })).min(1).max(20),
  sessionId: idSchema.optional(),
});
export type PreuseBody = z.infer<typeof preuseBodySchema>;

// JSON numbers or multipart strings both arrive here.
const optionalId = z.preprocess((v) => (v === '' || v === null ? undefined : v), idSchema.optional());
export const createFaultSchema = z
  .object({
    pointId: optionalId,
    gearId: optionalId,
    severity: severitySchema,
    description: z.string().trim().min(3, 'Describe what is wrong').max(2000, 'Keep it under 2,000 characters'),
  })
  .refine((f) => f.pointId !== undefined || f.gearId !== undefined, { message: 'Say which point or gear item the fault is on', path: ['pointId'] });
export type CreateFault = z.infer<typeof createFaultSchema>;

export const faultListQuery = z.object({ pointId: idSchema.optional(), gearId: idSchema.optional(), status: z.enum(['open', 'resolved']).optional() });
export type FaultListQuery = z.infer<typeof faultListQuery>;

export const resolveFaultSchema = z
  .object({
    resolution: faultResolutionSchema,
    note: z.string().trim().min(1, 'Say what was done').max(2000),
    /** For `replaced`: the stock item that takes the faulted item's place in the load path. */
    replacementGearId: idSchema.optional(),
    /** For `replaced`: what becomes of the old item. */
    oldGearStatus: z.enum(['quarantined', 'retired']).optional(),
  })
  .refine((r) => r.resolution !== 'replaced' || r.replacementGearId === undefined || r.oldGearStatus !== undefined, { message: 'Say whether the old item is quarantined or retired', path: ['oldGearStatus'] });
export type ResolveFault = z.infer<typeof resolveFaultSchema>;

export const faultSchema = z.object({
  id: z.number(),
  pointId: z.number().nullable(),
  pointLabel: z.string().nullable(),
  gearId: z.number().nullable(),
  gearSerial: z.string().nullable(),
  gearKind: z.string().nullable(),
  severity: severitySchema,
  description: z.string(),
  status: z.enum(['open', 'resolved']),
  reportedBy: z.string().nullable(),
  reportedAt: z.string(),
  resolution: faultResolutionSchema.nullable(),
  resolutionNote: z.string().nullable(),
  resolvedBy: z.string().nullable(),
  resolvedAt: z.string().nullable(),
  photos: z.array(z.object({ id: z.number(), url: z.string(), originalName: z.string() })),
});
export type Fault = z.infer<typeof faultSchema>;

export const inspectionSchema = z.object({
  id: z.number(),
  kind: z.enum(['pre_use', 'periodic', 'after_incident']),
  pointId: z.number().nullable(),
  pointLabel: z.string().nullable(),
  gearId: z.number().nullable(),
  gearSerial: z.string().nullable(),
  inspector: z.string().nullable(),
  inspectedAt: z.string(),
  result: inspectionResultSchema,
  notes: z.string(),
  cleared: z.boolean(),
  clearedUntil: z.string().nullable(),
  items: z.array(z.object({ key: z.string(), label: z.string(), result: inspectionResultSchema, note: z.string() })),
});
export type Inspection = z.infer<typeof inspectionSchema>;

export const inspectionLogQuery = z.object({
  from: instantSchema.optional(),
  to: instantSchema.optional(),
  pointId: idSchema.optional(),
  gearId: idSchema.optional(),
  kind: z.enum(['pre_use', 'periodic', 'after_incident']).optional(),
});
export type InspectionLogQuery = z.infer<typeof inspectionLogQuery>;
