import { z } from 'zod';
import { reasonSchema } from './rig';
import { changeoverSchema } from './sessions';
import { withoutFitPlaceSchema } from './places';
import { placeStatusSchema, pointStatuses } from './vocabulary';

/**
 * `GET /api/today`: the Today board (PRODUCT.md §6.1). The signed-in instructor's classes today
 * (every class for the other roles), each booked point's status at the class's time, the class's
 * students point by point (§11), and every point's status now. One request draws the whole board.
 */

const statusWord = z.enum(pointStatuses);

export const todayPointSchema = z.object({
  pointId: z.number(),
  label: z.string(),
  roomName: z.string(),
  status: statusWord,
  clearedUntil: z.string().nullable(),
  reasons: z.array(reasonSchema),
  /** Gear whose own inspection would unblock the point (a quarantined item, the apparatus's own inspection). */
  gearToInspect: z.array(z.object({ gearId: z.number(), kind: z.string(), serial: z.string(), inspection: z.enum(['after_incident', 'periodic']), standing: z.string() })).default([]),
  preuseDue: z.boolean(),
  lastPreuseAt: z.string().nullable(),
});
export type TodayPoint = z.infer<typeof todayPointSchema>;

/** A student booked into a class today (booked, attended or no-show; the waitlist is the desk's). */
export const todayStudentSchema = z.object({
  bookingId: z.number(),
  studentId: z.number(),
  name: z.string(),
  /** Null once the student's point is gone and no fit place is left. */
  pointId: z.number().nullable(),
  status: placeStatusSchema,
  /** Whether the waiver holds at the class's start (now, once it has begun): check-in needs it. */
  waiverOk: z.boolean(),
  /** Booked, but the point is blocked or gone and no fit place is left. */
  withoutFitPlace: z.boolean(),
});
export type TodayStudent = z.infer<typeof todayStudentSchema>;

export const todaySessionSchema = z.object({
  id: z.number(),
  className: z.string(),
  apparatus: z.string(),
  roomName: z.string(),
  instructorName: z.string(),
  startsAt: z.string(),
  endsAt: z.string(),
  cancelled: z.boolean(),
  cancelReason: z.string().nullable(),
  atRisk: z.boolean(),
  riskReasons: z.array(reasonSchema.extend({ pointId: z.number() })),
  points: z.array(todayPointSchema),
  /** Apparatus to mount before the class (PRODUCT.md §4.7). */
  changeovers: z.array(changeoverSchema).default([]),
  withoutFitPlace: z.array(withoutFitPlaceSchema),
  /** The class's students, for the names on each point and the check-in. */
  students: z.array(todayStudentSchema),
});
export type TodaySession = z.infer<typeof todaySessionSchema>;

export const todaySchema = z.object({
  studioDay: z.string(),
  timeZone: z.string(),
  sessions: z.array(todaySessionSchema),
  points: z.array(todayPointSchema),
});
export type Today = z.infer<typeof todaySchema>;
