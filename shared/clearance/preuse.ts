import { TZDate } from '@date-fns/tz';
import { memoize } from './memo';
import { format } from 'date-fns';
import type { LinkInput } from '../rigging/types';

export type PreuseItemKey = 'connectors_locked' | 'textile_unworn' | 'swivel_turning' | 'basket_clear';

export interface PreuseItem {
  key: PreuseItemKey;
  label: string;
}

/** PRODUCT.md §4.5: the short pre-use list for a path; the swivel item only where there is a swivel. */
export function preuseChecklist(links: LinkInput[]): PreuseItem[] {
  const items: PreuseItem[] = [
    { key: 'connectors_locked', label: 'Connectors locked and gate down' },
    { key: 'textile_unworn', label: 'Textile unworn: no cuts, burns, snags or pulled threads' },
  ];
  if (links.some((link) => link.gear.kind === 'swivel')) {
    items.push({ key: 'swivel_turning', label: 'Swivel turns freely' });
  }
  items.push({ key: 'basket_clear', label: 'Nothing sits in a connector basket past halfway' });
  return items;
}

/** The studio day of an instant, 'YYYY-MM-DD' in the studio's zone. */
export function studioDay(t: Date, timeZone: string): string {
  return studioDayOf(t.getTime(), timeZone);
}
const studioDayOf = memoize((ms: number, timeZone: string) => format(new TZDate(ms, timeZone), 'yyyy-MM-dd'));

/** A pre-use check is valid for the studio day it was made on only. */
export function preuseDue(lastPreuseAt: Date | null, now: Date, timeZone: string): boolean {
  return lastPreuseAt === null || studioDay(lastPreuseAt, timeZone) !== studioDay(now, timeZone);
}
