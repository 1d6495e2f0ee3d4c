import { z } from 'zod';
import { dateSchema, idSchema, instantSchema } from './common';
import { apparatusKindSchema } from './vocabulary';
import { pointStatusSchema, reasonSchema } from './rig';

const ids = z.array(idSchema).min(1, 'Pick at least one point').max(20, 'At most 20 points').refine((a) => new Set(a).size === a.length, 'List each point once');
/**
 * The apparatus to hang per point where the mounted one is not of the class's kind (PRODUCT.md
 * §4.7); a point left out gets the server's choice.
 */
const apparatusChoices = z
  .array(z.object({ pointId: idSchema, gearId: idSchema }))
  .max(20, 'At most 20 points')
  .refine((a) => new Set(a.map((x) => x.pointId)).size === a.length, 'Name one apparatus per point')
  .optional();
const when = z.object({ startsAt: instantSchema, endsAt: instantSchema });
const ordered = <T extends { startsAt?: string; endsAt?: string }>(v: T, ctx: z.RefinementCtx) => {
  if (v.startsAt && v.endsAt) {
    const ms = new Date(v.endsAt).getTime() - new Date(v.startsAt).getTime();
    if (ms <= 0) ctx.addIssue({ code: 'custom', path: ['endsAt'], message: 'The class must end after it starts' });
    else if (ms > 8 * 3600_000) ctx.addIssue({ code: 'custom', path: ['endsAt'], message: 'A class lasts at most 8 hours' });
  }
};

export const createSessionSchema = when
  .extend({
    classTypeId: idSchema,
    instructorId: idSchema,
    roomId: idSchema,
    pointIds: ids,
    apparatus: apparatusChoices,
    /** RFC 5545 RRULE without DTSTART, e.g. FREQ=WEEKLY;BYDAY=TU;COUNT=10. */
    rrule: z.string().trim().min(6).max(300).optional(),
    /** Studio days (YYYY-MM-DD) of the series to leave out. */
    skipDays: z.array(dateSchema).max(100).optional(),
    /** For a series some of whose occurrences cannot be booked: book the rest. */
    bookAvailable: z.boolean().optional(),
    /**
     * One per booking dialog opening: a repeat with the same key (a double click, a retry after a
     * lost answer) answers the first booking instead of booking again.
     */
    idempotencyKey: z.string().trim().regex(/^[A-Za-z0-9_-]{8,100}$/, 'A request key is 8 to 100 letters, digits, - or _').optional(),
  })
  .superRefine(ordered);
export type CreateSession = z.infer<typeof createSessionSchema>;

export const sessionListQuery = z.object({
  from: instantSchema,
  to: instantSchema,
  roomId: idSchema.optional(),
  instructorId: idSchema.optional(),
});
export type SessionListQuery = z.infer<typeof sessionListQuery>;

export const scopeSchema = z.enum(['this', 'following']).default('this');
export const updateSessionSchema = z
  .object({
    startsAt: instantSchema.optional(),
    endsAt: instantSchema.optional(),
    instructorId: idSchema.optional(),
    /** New points with the move, checked at the new time (a blocked point left behind in one step). */
    pointIds: ids.optional(),
    scope: scopeSchema,
  })
  .superRefine(ordered)
  .refine((v) => v.startsAt !== undefined || v.endsAt !== undefined || v.instructorId !== undefined || v.pointIds !== undefined, { message: 'Change the time, the points or the instructor' });
export type UpdateSession = z.infer<typeof updateSessionSchema>;

/**
 * Replace the booked points. With `roomId` (another room), the class moves to that room with
 * those points; every point must hang there. Without it the class keeps its room. With
 * `scope: "following"` every later class of the series takes the same points (and room).
 */
export const swapPointsSchema = z.object({ pointIds: ids, roomId: idSchema.optional(), apparatus: apparatusChoices, scope: scopeSchema });
export type SwapPoints = z.infer<typeof swapPointsSchema>;
export type SwapPointsInput = z.input<typeof swapPointsSchema>;
export const cancelSessionSchema = z.object({ reason: z.string().trim().min(1, 'Say why the class is cancelled').max(500), scope: scopeSchema });
export type CancelSession = z.infer<typeof cancelSessionSchema>;

export const availabilityQuery = when
  .extend({
    roomId: idSchema,
    classTypeId: idSchema,
    instructorId: idSchema.optional(),
    excludeSessionId: idSchema.optional(),
    /** A series: every class of it is checked, not only the first (startsAt/endsAt are the first's). */
    rrule: z.string().trim().min(6).max(300).optional(),
    /** Studio days left out of the series, comma-separated YYYY-MM-DD. */
    skipDays: z
      .string()
      .max(1200)
      .regex(/^(\d{4}-\d{2}-\d{2})(,\d{4}-\d{2}-\d{2})*$/, 'Days as YYYY-MM-DD, separated by commas')
      .optional(),
  })
  .superRefine(ordered);
export type AvailabilityQuery = z.infer<typeof availabilityQuery>;

/** The apparatus a point hangs for a class: `changeover` when it is not the one mounted now. */
export const apparatusChoiceSchema = z.object({ gearId: z.number(), kind: z.string(), serial: z.string(), changeover: z.boolean() });
export const pointVerdictSchema = z.object({ pointId: z.number(), label: z.string(), bookable: z.boolean(), reasons: z.array(reasonSchema), warnings: z.array(reasonSchema), apparatus: apparatusChoiceSchema.nullable().optional() });
export type PointVerdict = z.infer<typeof pointVerdictSchema>;

export const changeoverSchema = z.object({
  pointId: z.number(),
  pointLabel: z.string(),
  gearId: z.number(),
  kind: z.string(),
  serial: z.string(),
  mountedGearId: z.number().nullable(),
  mountedSerial: z.string().nullable(),
  message: z.string(),
});
export type ChangeoverWire = z.infer<typeof changeoverSchema>;


/**
 * A booked point with its status at the class's start. Once the class has started it is the record
 * kept then (PRODUCT.md §10): with the apparatus hanging at the start and when it was kept, or
 * `not_recorded` for a class that began before records were kept.
 */
export const sessionPointSchema = pointStatusSchema.extend({
  pointId: z.number(),
  label: z.string(),
  status: z.enum(['cleared', 'expiring', 'blocked', 'not_recorded']),
  apparatus: z.object({ gearId: z.number(), kind: z.string(), serial: z.string() }).nullable().optional(),
  recordedAt: z.string().optional(),
});
export const sessionSchema = z.object({
  id: z.number(),
  classTypeId: z.number(),
  className: z.string(),
  apparatus: apparatusKindSchema,
  capacity: z.number(),
  instructorId: z.number(),
  instructorName: z.string(),
  roomId: z.number(),
  roomName: z.string(),
  startsAt: z.string(),
  endsAt: z.string(),
  seriesId: z.number().nullable(),
  cancelled: z.boolean(),
  cancelReason: z.string().nullable(),
  pointIds: z.array(z.number()),
  points: z.array(sessionPointSchema),
  /** What hangs on each point for the class (PRODUCT.md §4.7). */
  hanging: z.array(z.object({ pointId: z.number(), gearId: z.number().nullable(), kind: z.string().nullable(), serial: z.string().nullable(), mounted: z.boolean() })).default([]),
  /** Apparatus to mount before the class, e.g. "Mount hoop HP-0102 on LS-3 before 18:30 on Thu 3 Dec". */
  changeovers: z.array(changeoverSchema).default([]),
  atRisk: z.boolean(),
  riskReasons: z.array(reasonSchema.extend({ pointId: z.number() })),
  inspectionDue: z.boolean(),
  /** One place per booked point that is not blocked at the session's time, up to the capacity. */
  places: z.number(),
  /** True once the class has started: `points` and `places` are then from the record kept at its start. */
  recordedAtStart: z.boolean().optional(),
  warnings: z.array(reasonSchema).optional(),
});
export type Session = z.infer<typeof sessionSchema>;

/** A point's history of classes (`GET /api/points/:id/records`): each as it stood at the class's start. */
export const classRecordSchema = z.object({
  sessionId: z.number(),
  pointId: z.number(),
  label: z.string(),
  startsAt: z.string(),
  endsAt: z.string(),
  cancelled: z.boolean(),
  className: z.string(),
  roomName: z.string(),
  instructorName: z.string(),
  status: sessionPointSchema.shape.status,
  clearedUntil: z.string().nullable(),
  reasons: z.array(reasonSchema),
  apparatus: z.object({ gearId: z.number(), kind: z.string(), serial: z.string() }).nullable(),
  recordedAt: z.string(),
});
export type ClassRecord = z.infer<typeof classRecordSchema>;
export const classRecordPageSchema = z.object({ items: z.array(classRecordSchema), nextCursor: z.string().nullable() });
