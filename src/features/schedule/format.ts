import { gearKindLabels } from '../../../shared/rigging/strength';
import type { ApparatusKind } from '../../../shared/schemas/vocabulary';
import { formatInZone } from '../../components/ui/zoned-time';

export const apparatusLabel = (kind: ApparatusKind) => gearKindLabels[kind];

const cache = new Map<string, Intl.DateTimeFormat>();
function fmt(timeZone: string, key: string, o: Intl.DateTimeFormatOptions) {
  const k = `${timeZone}|${key}`;
  let f = cache.get(k);
  if (!f) cache.set(k, (f = new Intl.DateTimeFormat('en-GB', { timeZone, ...o })));
  return f;
}

/** "Thu 3 Dec" in the studio's zone. */
export const shortDay = (iso: string, timeZone: string) => fmt(timeZone, 'sd', { weekday: 'short', day: 'numeric', month: 'short' }).format(new Date(iso));
/** "Thu 3 Dec 2026": a day with its year, for lists that may run past New Year. */
export const dayWithYear = (iso: string, timeZone: string) => fmt(timeZone, 'sdy', { weekday: 'short', day: 'numeric', month: 'short', year: 'numeric' }).format(new Date(iso));
/** "Thursday 3 December 2026" in the studio's zone. */
export const longDay = (iso: string, timeZone: string) => fmt(timeZone, 'ld', { weekday: 'long', day: 'numeric', month: 'long', year: 'numeric' }).format(new Date(iso));
/** "18:00" in the studio's zone. */
export const clock = (iso: string, timeZone: string) => formatInZone(iso, timeZone, 'time');
/** "18:00–19:00". */
export const clockRange = (from: string, to: string, timeZone: string) => `${clock(from, timeZone)}–${clock(to, timeZone)}`;
/** "Thu 3 Dec, 18:00–19:00". */
export const whenShort = (from: string, to: string, timeZone: string) => `${shortDay(from, timeZone)}, ${clockRange(from, to, timeZone)}`;
/** The zone's short name at an instant, e.g. "GMT" or "BST". */
export const zoneAbbrev = (iso: string, timeZone: string) =>
  fmt(timeZone, 'tz', { timeZoneName: 'short' }).formatToParts(new Date(iso)).find((p) => p.type === 'timeZoneName')?.value ?? timeZone;

/** "3 of 8 places usable": usable places (booked, unblocked points) against the class's capacity, never read as "3 taken". */
export const placesText = (places: number, capacity: number) => `${places} of ${capacity} places usable`;
