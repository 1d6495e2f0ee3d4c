import { TZDate } from '@date-fns/tz';
import type { ApparatusKind } from '../shared/schemas/vocabulary';
import { INSTRUCTOR, JUNO, PIET, ROOMS } from './demo-data';

/** The demo studio's class types. */
export const classTypePlans: Array<{
  name: string;
  apparatus: ApparatusKind;
  durationMinutes: number;
  capacity: number;
  performersPerPoint: number;
  dynamicFactor: number | null;
}> = [
  { name: 'Silks Foundations', apparatus: 'fabric', durationMinutes: 60, capacity: 8, performersPerPoint: 1, dynamicFactor: null },
  { name: 'Hoop Flow', apparatus: 'hoop', durationMinutes: 60, capacity: 6, performersPerPoint: 1, dynamicFactor: null },
  // [studio choice] Duo static trapeze: the published duo fixed-trapeze peak is 2.5 × body weight
  // (Cossin, Bergeron-Parenteau & Ross 2022); the studio rounds it up to 3 for this class.
  { name: 'Duo Trapeze', apparatus: 'trapeze', durationMinutes: 75, capacity: 4, performersPerPoint: 2, dynamicFactor: 3 },
  { name: 'Rope Climb', apparatus: 'rope', durationMinutes: 45, capacity: 4, performersPerPoint: 1, dynamicFactor: null },
  { name: 'Hammock Stretch', apparatus: 'hammock', durationMinutes: 60, capacity: 6, performersPerPoint: 1, dynamicFactor: null },
];

/** A slot time 'HH:MM', or one placed relative to the hour the seed runs. */
export type SlotTime = string | 'later_today' | 'this_evening';

export interface WeeklyClass {
  /** Days after today's weekday: 0 is today's weekday, 6 is yesterday's. */
  day: number;
  time: SlotTime;
  classType: string;
  instructor: string;
  room: string;
  points: string[];
}

/**
 * One week of classes, counted from today's weekday so that instructor@loftwise.test always
 * teaches today (late morning or afternoon, and in the evening) and yesterday's classes match
 * yesterday's pre-use checks. Points are those whose mounted apparatus is the class's kind.
 */
export const weeklyClasses: WeeklyClass[] = [
  { day: 0, time: 'later_today', classType: 'Silks Foundations', instructor: INSTRUCTOR, room: ROOMS.hall, points: ['MH-1', 'MH-2', 'MH-3'] },
  { day: 0, time: 'this_evening', classType: 'Hoop Flow', instructor: INSTRUCTOR, room: ROOMS.loft, points: ['LS-1', 'LS-2'] },
  { day: 0, time: '19:00', classType: 'Duo Trapeze', instructor: PIET, room: ROOMS.hall, points: ['MH-5', 'MH-6'] },
  { day: 1, time: '18:00', classType: 'Hammock Stretch', instructor: JUNO, room: ROOMS.hall, points: ['MH-7', 'MH-8'] },
  { day: 1, time: '19:00', classType: 'Hoop Flow', instructor: PIET, room: ROOMS.loft, points: ['LS-1', 'LS-4'] },
  { day: 2, time: '18:00', classType: 'Silks Foundations', instructor: JUNO, room: ROOMS.hall, points: ['MH-1', 'MH-3', 'MH-4'] },
  { day: 2, time: '19:15', classType: 'Rope Climb', instructor: PIET, room: ROOMS.loft, points: ['LS-6', 'LS-7'] },
  { day: 3, time: '18:00', classType: 'Hoop Flow', instructor: JUNO, room: ROOMS.loft, points: ['LS-1', 'LS-3'] },
  { day: 3, time: '18:30', classType: 'Duo Trapeze', instructor: INSTRUCTOR, room: ROOMS.hall, points: ['MH-5', 'MH-6'] },
  { day: 4, time: '18:00', classType: 'Silks Foundations', instructor: PIET, room: ROOMS.hall, points: ['MH-1', 'MH-2', 'MH-4'] },
  { day: 4, time: '18:30', classType: 'Rope Climb', instructor: JUNO, room: ROOMS.loft, points: ['LS-6', 'LS-7'] },
  { day: 5, time: '10:00', classType: 'Silks Foundations', instructor: INSTRUCTOR, room: ROOMS.hall, points: ['MH-1', 'MH-3', 'MH-4'] },
  { day: 5, time: '11:30', classType: 'Hammock Stretch', instructor: JUNO, room: ROOMS.hall, points: ['MH-7', 'MH-8'] },
  { day: 6, time: '18:00', classType: 'Silks Foundations', instructor: INSTRUCTOR, room: ROOMS.hall, points: ['MH-1', 'MH-2', 'MH-3', 'MH-4'] },
  { day: 6, time: '19:30', classType: 'Duo Trapeze', instructor: PIET, room: ROOMS.hall, points: ['MH-5', 'MH-6'] },
];

/** The wall-clock time of a slot, given when the seed runs. */
export function slotClock(time: SlotTime, now: Date, timeZone: string): string {
  const hour = new TZDate(now.getTime(), timeZone).getHours();
  if (time === 'later_today') return `${String(Math.min(Math.max(hour + 2, 10), 16)).padStart(2, '0')}:00`;
  // Started late, the demo still has a class ahead today for the instructor's Today page (until 23:30).
  if (time === 'this_evening') return hour >= 17 ? `${Math.min(hour + 1, 23)}:30` : '18:30';
  return time;
}

/** The class that the cancelled demo session belongs to, and which week of it (1 = next week). */
export const cancelledOccurrence = { day: 4, classType: 'Rope Climb', weeksAhead: 1, reason: 'Juno is away on a rigging course that week; students have been offered places in the next Rope Climb.' };
