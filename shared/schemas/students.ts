import { z } from 'zod';
import { dateSchema, idSchema, labelText } from './common';
import { cursorSchema, limitSchema, pageSchema } from './page';
import { labelProblem, normaliseLabel } from '../text/labels';
import { placeStatusSchema, waiverMethodSchema } from './vocabulary';

/**
 * Students and waivers (PRODUCT.md §11). A student is a person who takes places in classes; staff
 * keep them without them needing an account.
 */

/**
 * The one form of a student's e-mail address for lookups and duplicates: NFKC (a full-width "＠"
 * or letter becomes the plain one), trimmed, lower case. Stored as `email_key`; the address is
 * stored as typed after NFKC and trimming.
 */
export const studentEmailKey = (raw: string): string => raw.normalize('NFKC').trim().toLowerCase();

const email = z
  .string()
  .transform((s) => s.normalize('NFKC').trim())
  .pipe(z.email({ message: 'Enter an e-mail address such as name@example.test' }))
  .pipe(z.string().max(254, 'Keep the address under 254 characters'));

/** A phone number as people type it: digits with spaces, +, -, dots, brackets; at least 5 digits. */
const phone = z
  .string()
  .transform((s) => normaliseLabel(s))
  .pipe(
    z
      .string()
      .max(40, 'Keep the number under 40 characters')
      .regex(/^\+?[0-9 ().\-/]*$/, 'Use digits, spaces and + ( ) - only')
      .refine((s) => s === '' || s.replace(/\D/g, '').length >= 5, 'Enter the whole number, at least 5 digits'),
  )
  .transform((s) => (s === '' ? null : s));

const optionalName = z
  .string()
  .superRefine((v, ctx) => {
    const problem = labelProblem(v);
    if (problem) ctx.addIssue({ code: 'custom', message: problem });
  })
  .transform(normaliseLabel)
  .pipe(z.string().max(120, 'Keep it under 120 characters'))
  .transform((s) => (s === '' ? null : s));

export const createStudentSchema = z
  .object({
    name: labelText(120, 'Enter the student’s name'),
    email,
    phone: phone.nullable().optional(),
    emergencyName: optionalName.nullable().optional(),
    emergencyPhone: phone.nullable().optional(),
  })
  .strict();
export type CreateStudent = z.infer<typeof createStudentSchema>;

export const updateStudentSchema = z
  .object({
    name: labelText(120, 'Enter the student’s name').optional(),
    email: email.optional(),
    phone: phone.nullable().optional(),
    emergencyName: optionalName.nullable().optional(),
    emergencyPhone: phone.nullable().optional(),
  })
  .strict();
export type UpdateStudent = z.infer<typeof updateStudentSchema>;

/** Keyset of the student list: name, then id (names repeat). */
export const nameIdKey = z.tuple([z.string().max(200), z.number().int().positive()]);
export const studentListQuery = z
  .object({
    /** Part of a name, an e-mail address or a phone number. */
    q: z.string().max(120, 'Keep the search under 120 characters').optional(),
    cursor: cursorSchema(nameIdKey).optional(),
    limit: limitSchema.optional(),
  })
  .strict();
export type StudentListQuery = z.infer<typeof studentListQuery>;

export const waiverStates = ['valid', 'expired', 'missing'] as const;
export const waiverStateSchema = z.enum(waiverStates);
export type WaiverState = z.infer<typeof waiverStateSchema>;

/** A student's waiver as of now: the latest acceptance and whether it still holds. */
export const waiverStatusSchema = z.object({
  state: waiverStateSchema,
  ok: z.boolean(),
  version: z.number().nullable(),
  method: waiverMethodSchema.nullable(),
  acceptedAt: z.string().nullable(),
  validUntil: z.string().nullable(),
});
export type WaiverStatus = z.infer<typeof waiverStatusSchema>;

export const studentSchema = z.object({
  id: z.number(),
  name: z.string(),
  email: z.string(),
  phone: z.string().nullable(),
  emergencyName: z.string().nullable(),
  emergencyPhone: z.string().nullable(),
  waiver: waiverStatusSchema,
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type Student = z.infer<typeof studentSchema>;
export const studentPageSchema = pageSchema(studentSchema);

/** One of a student's bookings, as their page lists them. */
export const studentBookingSchema = z.object({
  id: z.number(),
  sessionId: z.number(),
  className: z.string(),
  apparatus: z.string(),
  startsAt: z.string(),
  endsAt: z.string(),
  sessionCancelled: z.boolean(),
  pointId: z.number().nullable(),
  pointLabel: z.string().nullable(),
  status: placeStatusSchema,
  position: z.number().nullable(),
});
export type StudentBooking = z.infer<typeof studentBookingSchema>;

export const studentDetailSchema = studentSchema.extend({
  upcoming: z.array(studentBookingSchema),
  past: z.array(studentBookingSchema),
  /** Classes marked attended. */
  attendanceCount: z.number(),
});
export type StudentDetail = z.infer<typeof studentDetailSchema>;

/** `POST /api/students/:id/merge`: this student (the duplicate) is merged into `intoId` (the one kept). */
export const mergeStudentSchema = z.object({ intoId: idSchema }).strict();
export type MergeStudent = z.infer<typeof mergeStudentSchema>;

// ---- Waivers

export const waiverVersionSchema = z.object({ id: z.number(), version: z.number(), text: z.string(), createdAt: z.string() });
export type WaiverVersion = z.infer<typeof waiverVersionSchema>;

/** `POST /api/waivers` (owner): a new version of the waiver text; versions are never edited. */
export const createWaiverVersionSchema = z
  .object({
    text: z
      .string()
      .transform((s) => s.normalize('NFKC').trim())
      .pipe(z.string().min(20, 'Write the waiver text (at least 20 characters)').max(20000, 'Keep the waiver under 20,000 characters')),
  })
  .strict();
export type CreateWaiverVersion = z.infer<typeof createWaiverVersionSchema>;

const fullName = labelText(120, 'Type the student’s full name');

/** `POST /api/students/:id/waiver` (desk): a paper waiver signed on `signedOn` (default today). */
export const paperWaiverSchema = z
  .object({
    /** The version signed; omitted: the current one. */
    version: z.number().int().positive().optional(),
    fullName,
    signedOn: dateSchema.optional(),
  })
  .strict();
export type PaperWaiver = z.infer<typeof paperWaiverSchema>;

/** `POST /api/my/waiver` (the student, online): the version read and the full name typed. */
export const onlineWaiverSchema = z.object({ version: z.number().int().positive(), fullName: z.string().pipe(fullName) }).strict();
export type OnlineWaiver = z.infer<typeof onlineWaiverSchema>;

export const waiverAcceptanceSchema = z.object({
  id: z.number(),
  studentId: z.number(),
  version: z.number(),
  fullName: z.string(),
  method: waiverMethodSchema,
  acceptedAt: z.string(),
  validUntil: z.string(),
});
export type WaiverAcceptance = z.infer<typeof waiverAcceptanceSchema>;
