import { z } from 'zod';
import { createSessionSchema, type CreateSession } from '../../../shared/schemas/sessions';
import { buildRrule, MAX_CLASSES, weekdays, type WeekdayCode } from './recurrence';
import { instantFromWall, minutesOf } from './zone';

const time = z.string().regex(/^\d{2}:\d{2}$/, 'Pick a time');
const codes = weekdays.map((w) => w.code) as [WeekdayCode, ...WeekdayCode[]];

/** What the booking dialog edits: the studio's day and clock times, and the repeat as choices. */
export const bookingFormSchema = z
  .object({
    classTypeId: z.string().min(1, 'Pick a class type'),
    instructorId: z.string().min(1, 'Pick an instructor'),
    roomId: z.string().min(1, 'Pick a room'),
    date: z.iso.date({ message: 'Pick the day' }),
    start: time,
    end: time,
    repeat: z.enum(['none', 'weekly']),
    days: z.array(z.enum(codes)),
    ends: z.enum(['until', 'count']),
    until: z.string(),
    count: z.number({ message: 'Enter how many classes' }).int('Whole classes only').min(1, 'At least one class').max(MAX_CLASSES, `At most ${MAX_CLASSES} classes`),
    skipDays: z.array(z.iso.date()),
    pointIds: z.array(z.number()).min(1, 'Tick at least one point').max(20, 'At most 20 points'),
  })
  .superRefine((v, ctx) => {
    const s = minutesOf(v.start);
    const e = minutesOf(v.end);
    if (s !== null && e !== null && e <= s) ctx.addIssue({ code: 'custom', path: ['end'], message: 'The class must end after it starts (on the same day)' });
    if (v.repeat === 'weekly') {
      if (v.days.length === 0) ctx.addIssue({ code: 'custom', path: ['days'], message: 'Tick at least one day' });
      if (v.ends === 'until') {
        if (!/^\d{4}-\d{2}-\d{2}$/.test(v.until)) ctx.addIssue({ code: 'custom', path: ['until'], message: 'Pick the last day' });
        else if (v.until < v.date) ctx.addIssue({ code: 'custom', path: ['until'], message: 'The last day must be on or after the first' });
      }
    }
  });
export type BookingForm = z.infer<typeof bookingFormSchema>;

/** The class's first start and end as instants, or null while the day or times are incomplete. */
export function firstTimes(v: Pick<BookingForm, 'date' | 'start' | 'end'>, timeZone: string) {
  const startsAt = instantFromWall(v.date, v.start, timeZone);
  const endsAt = instantFromWall(v.date, v.end, timeZone);
  if (!startsAt || !endsAt || endsAt <= startsAt) return null;
  return { startsAt, endsAt };
}

export function rruleOf(v: BookingForm, timeZone: string): string | undefined {
  return v.repeat === 'weekly' ? buildRrule({ kind: 'weekly', days: v.days, ends: v.ends, until: v.until, count: v.count }, timeZone) : undefined;
}

/** A fresh key for one opening of the booking dialog (random; works outside a secure context too). */
export function newRequestKey(): string {
  const bytes = new Uint8Array(16);
  crypto.getRandomValues(bytes);
  return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');
}

/** The wire body, checked with the shared schema the server uses. */
export function bookingBody(v: BookingForm, timeZone: string, bookAvailable = false, idempotencyKey?: string): { ok: true; body: CreateSession } | { ok: false; message: string } {
  const t = firstTimes(v, timeZone);
  if (!t) return { ok: false, message: 'Check the day and times.' };
  const rrule = rruleOf(v, timeZone);
  const parsed = createSessionSchema.safeParse({
    classTypeId: Number(v.classTypeId),
    instructorId: Number(v.instructorId),
    roomId: Number(v.roomId),
    startsAt: t.startsAt.toISOString(),
    endsAt: t.endsAt.toISOString(),
    pointIds: v.pointIds,
    ...(rrule ? { rrule, skipDays: v.skipDays.length ? v.skipDays : undefined, bookAvailable: bookAvailable || undefined } : {}),
    idempotencyKey,
  });
  return parsed.success ? { ok: true, body: parsed.data } : { ok: false, message: parsed.error.issues[0]?.message ?? 'Check the form.' };
}
