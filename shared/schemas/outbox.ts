import { z } from 'zod';
import { cursorSchema, idKey, limitSchema } from './page';

export const outboxStates = ['queued', 'sending', 'sent', 'failed', 'skipped'] as const;
/** Students' messages (PRODUCT.md §11): each at most once per key, like every other. */
export const studentOutboxKinds = ['booking_confirmed', 'waitlist_place_offered', 'class_moved_student', 'class_cancelled_student', 'sign_in_link'] as const;
export type StudentOutboxKind = (typeof studentOutboxKinds)[number];
/** What a message is about: an instructor's reminder, an at-risk alert, a change to a class, the rigger's digest, a fault, or a student's message. */
export const outboxKinds = ['reminder', 'at_risk', 'session_change', 'digest', 'fault', ...studentOutboxKinds] as const;
export type OutboxKind = (typeof outboxKinds)[number];
export const outboxKindLabels: Record<OutboxKind, string> = {
  reminder: 'Reminder',
  at_risk: 'At-risk alert',
  session_change: 'Class changed',
  digest: 'Rigging digest',
  fault: 'Fault report',
  booking_confirmed: 'Student: booking confirmed',
  waitlist_place_offered: 'Student: place offered',
  class_moved_student: 'Student: class moved',
  class_cancelled_student: 'Student: class cancelled',
  sign_in_link: 'Student: sign-in link',
};

/** The Mailbox's filters: a kind of message and one recipient's address (compared without case). */
export const mailFilterFields = {
  kind: z.enum(outboxKinds, { message: 'Pick a kind of message from the list' }).optional(),
  to: z.string().trim().toLowerCase().min(3, 'Enter a whole e-mail address').max(254, 'An e-mail address is at most 254 characters').optional(),
};
export const mailboxQuery = z.object(mailFilterFields);
export type MailFilter = z.infer<typeof mailboxQuery>;

/** Newest first, keyset on id. */
export const outboxQuery = z.object({ state: z.enum(outboxStates).optional(), ...mailFilterFields, cursor: cursorSchema(idKey).optional(), limit: limitSchema.optional() });

export const outboxMessageSchema = z.object({
  id: z.number(),
  kind: z.enum(outboxKinds),
  to: z.array(z.string()),
  subject: z.string(),
  state: z.enum(outboxStates),
  attempts: z.number(),
  nextAttemptAt: z.string(),
  lastError: z.string().nullable(),
  createdAt: z.string(),
  sentAt: z.string().nullable(),
});
export type OutboxMessageWire = z.infer<typeof outboxMessageSchema>;
