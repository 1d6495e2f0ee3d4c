import { z } from 'zod';
import { idSchema } from './common';
import { placeStatusSchema } from './vocabulary';

/** Places: one student on one performer slot of one booked point (PRODUCT.md §11). */

const reason = z.object({ code: z.string(), message: z.string() });

/** `POST /api/sessions/:id/bookings` (desk). `waitlist: false`: refuse with 409 `session_full` rather than waitlist. */
export const createBookingSchema = z
  .object({
    studentId: idSchema,
    /** The point the desk chooses; omitted: the server picks a free place. */
    pointId: idSchema.optional(),
    waitlist: z.boolean().optional(),
  })
  .strict();
export type CreateBooking = z.infer<typeof createBookingSchema>;

/** The answer to a booking: 201 with the place, or its waitlist position. */
export const bookingResultSchema = z.object({
  id: z.number(),
  sessionId: z.number(),
  studentId: z.number(),
  status: placeStatusSchema,
  pointId: z.number().nullable(),
  /** 1-based place in the waitlist while waitlisted. */
  position: z.number().optional(),
  warnings: z.array(reason),
});
export type BookingResult = z.infer<typeof bookingResultSchema>;

/** `GET /api/sessions/:id/bookings` (staff): every place of the class, booked first, then the waitlist in order, then the rest. */
export const sessionBookingSchema = z.object({
  id: z.number(),
  studentId: z.number(),
  name: z.string(),
  email: z.string(),
  pointId: z.number().nullable(),
  pointLabel: z.string().nullable(),
  status: placeStatusSchema,
  waiverOk: z.boolean(),
  /** Waitlist position (1 = next), null otherwise. */
  position: z.number().nullable(),
  /** Booked, but its point is blocked or gone and no fit place is left (or it was not yet moved). */
  withoutFitPlace: z.boolean(),
  checkedInAt: z.string().nullable(),
});
export type SessionBooking = z.infer<typeof sessionBookingSchema>;
export const sessionBookingListSchema = z.array(sessionBookingSchema);

/** A student without a fit place, as the session, Today and the at-risk alert list them. */
export const withoutFitPlaceSchema = z.object({ bookingId: z.number(), studentId: z.number(), name: z.string(), pointId: z.number().nullable() });
export type WithoutFitPlace = z.infer<typeof withoutFitPlaceSchema>;

/** What `GET /api/sessions/:id` gains (PRODUCT.md §11). */
export const sessionPlacesSchema = z.object({
  capacity: z.number(),
  placesLeft: z.number(),
  booked: z.number(),
  waitlisted: z.number(),
  withoutFitPlace: z.array(withoutFitPlaceSchema),
  /** Students on each point of the class. */
  pointStudents: z.array(z.object({ pointId: z.number(), places: z.number(), students: z.array(z.object({ bookingId: z.number(), studentId: z.number(), name: z.string(), status: placeStatusSchema })) })),
});
export type SessionPlaces = z.infer<typeof sessionPlacesSchema>;

export const cancelBookingSchema = z.object({ reason: z.string().trim().max(500).optional() }).strict();
export type CancelBooking = z.infer<typeof cancelBookingSchema>;

export const checkInSchema = z.object({ outcome: z.enum(['attended', 'no_show']) }).strict();
export type CheckIn = z.infer<typeof checkInSchema>;

/** `POST /api/bookings/:id/move`: the desk moves one student to a free place on another point of the class. */
export const moveBookingSchema = z.object({ pointId: idSchema }).strict();
export type MoveBooking = z.infer<typeof moveBookingSchema>;
