import { z } from 'zod';
import { idSchema, instantSchema } from './common';
import { apparatusKindSchema } from './vocabulary';
import { onlineWaiverSchema, studentEmailKey, type OnlineWaiver } from './students';

/**
 * The student's side (PRODUCT.md §11): their profile, their own bookings, the waiver, their
 * calendar feed, and the public timetable anyone may read.
 */

/** The form an e-mail is looked up by for students (as `students.email_key`). */
export { studentEmailKey };

/** The longest public timetable range: five weeks and a day ([studio choice]: a month view and a clock change). */
export const PUBLIC_TIMETABLE_MAX_DAYS = 36;

export const publicTimetableQuery = z
  .object({ from: instantSchema, to: instantSchema })
  .superRefine((v, ctx) => {
    const from = Date.parse(v.from);
    const to = Date.parse(v.to);
    if (to <= from) ctx.addIssue({ code: 'custom', path: ['to'], message: 'End the range after its start' });
    else if (to - from > PUBLIC_TIMETABLE_MAX_DAYS * 86_400_000) ctx.addIssue({ code: 'custom', path: ['to'], message: `Ask for at most ${PUBLIC_TIMETABLE_MAX_DAYS} days at a time` });
  });
export type PublicTimetableQuery = z.infer<typeof publicTimetableQuery>;

/** One class on the public timetable: no staff or student data, by construction. */
export const publicClassSchema = z.object({
  sessionId: z.number(),
  className: z.string(),
  apparatus: apparatusKindSchema,
  startsAt: z.string(),
  endsAt: z.string(),
  placesLeft: z.number(),
});
export type PublicClass = z.infer<typeof publicClassSchema>;
export const publicTimetableSchema = z.array(publicClassSchema);

/** `GET /api/public/studio`: what the public timetable needs to show times in the studio's zone. */
export const publicStudioSchema = z.object({ name: z.string(), timeZone: z.string() });
export type PublicStudio = z.infer<typeof publicStudioSchema>;

export const myBookingStatuses = ['booked', 'waitlisted', 'cancelled', 'attended', 'no_show'] as const;

export const myBookingSchema = z.object({
  id: z.number(),
  sessionId: z.number(),
  className: z.string(),
  apparatus: apparatusKindSchema,
  roomName: z.string(),
  startsAt: z.string(),
  endsAt: z.string(),
  status: z.enum(myBookingStatuses),
  /** The point the student hangs on, when placed. */
  pointLabel: z.string().nullable(),
  /** Place in the waitlist (1 = next), while waitlisted. */
  position: z.number().nullable(),
  sessionCancelled: z.boolean(),
  /** The last instant the student may cancel themself (start − studentCancelCutoffHours). */
  cancelBefore: z.string(),
  canCancel: z.boolean(),
});
export type MyBooking = z.infer<typeof myBookingSchema>;
export const myBookingListSchema = z.array(myBookingSchema);

export const bookMyselfSchema = z.object({ sessionId: idSchema });
export type BookMyself = z.infer<typeof bookMyselfSchema>;

/** Answer to a booking: as the desk's (PRODUCT.md §11), with warnings such as `waiver_missing`. */
export const myBookingResultSchema = z.object({
  id: z.number(),
  status: z.enum(['booked', 'waitlisted']),
  pointId: z.number().nullable(),
  position: z.number().nullable().optional(),
  warnings: z.array(z.object({ code: z.string(), message: z.string() })).optional(),
});
export type MyBookingResult = z.infer<typeof myBookingResultSchema>;

/** `POST /api/my/waiver { version, fullName }`: the version read and the full name typed. */
export const signWaiverSchema = onlineWaiverSchema;
export type SignWaiver = OnlineWaiver;

export const myWaiverSchema = z.object({
  /** The waiver in force, to read and sign; null while the owner has written none. */
  current: z.object({ version: z.number(), text: z.string() }).nullable(),
  /** The student's latest acceptance, if any. */
  accepted: z.object({ version: z.number(), fullName: z.string(), acceptedAt: z.string(), validUntil: z.string(), method: z.string() }).nullable(),
  /** True when an acceptance of the current version is valid now. */
  valid: z.boolean(),
});
export type MyWaiver = z.infer<typeof myWaiverSchema>;

export const myProfileSchema = z.object({
  studentId: z.number(),
  name: z.string(),
  email: z.string(),
  phone: z.string().nullable(),
  emergencyName: z.string().nullable(),
  emergencyPhone: z.string().nullable(),
  waiverValid: z.boolean(),
  cancelCutoffHours: z.number(),
});
export type MyProfile = z.infer<typeof myProfileSchema>;

/** A private calendar feed: the URL is shown only when it is made (only its hash is kept). */
export const feedStateSchema = z.object({ active: z.boolean(), createdAt: z.string().nullable() });
export type FeedState = z.infer<typeof feedStateSchema>;
export const newFeedSchema = z.object({ url: z.string(), createdAt: z.string() });
export type NewFeed = z.infer<typeof newFeedSchema>;
