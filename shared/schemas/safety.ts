import { z } from 'zod';
import { idSchema, instantSchema } from './common';
import { faultResolutionSchema, inspectionResultSchema, severitySchema } from './vocabulary';
import { pointStatusSchema, reasonSchema } from './rig';
import { cursorSchema, instantIdKey, limitSchema } from './page';

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
  /** The point is cleared now: the clearance was signed and no rule blocks it. */
  cleared: z.boolean(),
  /** The rigger's clearance is on record (no item failed, no fault open), even if another rule still blocks the point. */
  clearanceSigned: z.boolean(),
  clearedUntil: z.string().nullable(),
  reasons: z.array(reasonSchema),
  faultIds: z.array(z.number()),
  status: pointStatusSchema,
});
export type ClearanceResult = z.infer<typeof clearanceResultSchema>;

export const gearInspectionBodySchema = z.object({ kind: z.enum(['periodic', 'after_incident']), result: inspectionResultSchema, note: note.optional() });
export type GearInspectionBody = z.infer<typeof gearInspectionBodySchema>;

export const preuseBodySchema = z.object({
  // 'not_applicable' only for a row that offers it (the server checks); recorded as a pass noted "not applicable".
  items: z.array(z.object({ key: z.string().min(1).max(60), result: z.enum(['pass', 'fail', 'not_applicable']), note: note.optional() })).min(1).max(20),
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

export const faultFilters = z.object({ pointId: idSchema.optional(), gearId: idSchema.optional(), status: z.enum(['open', 'resolved']).optional() });
export type FaultFilters = z.infer<typeof faultFilters>;
/** Open faults first, then newest reported first; the cursor is the last row's [status, reportedAt, id]. */
export const faultCursorKey = z.tuple([z.enum(['open', 'resolved']), z.string().max(40), z.number().int().positive()]);
export const faultListQuery = faultFilters.extend({ cursor: cursorSchema(faultCursorKey).optional(), limit: limitSchema.optional() });
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
  /** On the answer to a report only: photos that could not be stored (the fault is recorded all the same). */
  photosNotStored: z.array(z.object({ name: z.string(), reason: z.string() })).optional(),
  warnings: z.array(reasonSchema).optional(),
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
  /** Yes only when this inspection cleared its point (see shared/records/inspection-record.ts). */
  cleared: z.boolean(),
  /** The row's own flag: a clean inspection was signed as the point's clearance (it may still have stayed blocked). */
  clearanceSigned: z.boolean(),
  clearedUntil: z.string().nullable(),
  /** The point's status when the inspection was signed, from the row; null for gear inspected on its own. */
  pointStatus: z
    .object({ status: z.enum(['cleared', 'expiring', 'blocked']).nullable(), recorded: z.boolean(), reasons: z.array(reasonSchema) })
    .nullable(),
  items: z.array(z.object({ key: z.string(), label: z.string(), result: inspectionResultSchema, note: z.string() })),
  /** Photos kept with the inspection or with a fault it opened. */
  photos: z.array(z.object({ id: z.number(), name: z.string(), url: z.string() })),
});
export type Inspection = z.infer<typeof inspectionSchema>;

const inspectionFilterFields = {
  from: instantSchema.optional(),
  to: instantSchema.optional(),
  pointId: idSchema.optional(),
  gearId: idSchema.optional(),
  kind: z.enum(['pre_use', 'periodic', 'after_incident']).optional(),
};
const rangeInOrder = (q: { from?: string; to?: string }) => !q.from || !q.to || Date.parse(q.from) <= Date.parse(q.to);
const rangeMessage = { message: 'The end of the range comes before its start', path: ['to'] };
/** The filters the log, the CSV and the printable log share; every range, however long, is complete. */
export const inspectionLogFilters = z.object(inspectionFilterFields).refine(rangeInOrder, rangeMessage);
export type InspectionLogFilters = z.infer<typeof inspectionLogFilters>;
/** Newest first; the cursor is the last row's [inspectedAt, id]. */
export const inspectionLogQuery = z
  .object({ ...inspectionFilterFields, cursor: cursorSchema(instantIdKey).optional(), limit: limitSchema.optional() })
  .refine(rangeInOrder, rangeMessage);
export type InspectionLogQuery = z.infer<typeof inspectionLogQuery>;
