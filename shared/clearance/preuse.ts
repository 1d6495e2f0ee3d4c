import { TZDate } from '@date-fns/tz';
import { memoize } from './memo';
import { format } from 'date-fns';
import type { LinkInput } from '../rigging/types';
import { describeGear } from '../rigging';
import { apparatusKinds, intervalClassOfKind, isConnectorKind } from '../schemas/vocabulary';

export type PreuseItemKey = 'connectors_locked' | 'textile_unworn' | 'swivel_turning' | 'basket_clear' | 'apparatus_sound';

export interface PreuseItem {
  key: PreuseItemKey;
  label: string;
  /** The row may be answered "not applicable" (nothing is threaded through a basket today, say). */
  notApplicable?: boolean;
}

const list = (names: string[]) => (names.length <= 2 ? names.join(' and ') : `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`);

/**
 * PRODUCT.md §4.5: the short pre-use list, built from the point's load path so each row names
 * what is there: a gate row only for connectors with a gate (not a swivel or a clamp), the
 * textile row for the textiles, the swivel row for a swivel, the hardware apparatus by name.
 * "Not applicable" is offered where a row may not fit today's rigging (the basket row).
 */
export function preuseChecklist(links: LinkInput[]): PreuseItem[] {
  const gear = links.map((l) => l.gear);
  const gated = gear.filter((g) => isConnectorKind(g.kind) && g.gate !== 'none');
  const textiles = gear.filter((g) => intervalClassOfKind[g.kind] === 'textile');
  const swivels = gear.filter((g) => g.kind === 'swivel');
  const connectors = gear.filter((g) => isConnectorKind(g.kind));
  const hardApparatus = gear.filter((g) => (apparatusKinds as readonly string[]).includes(g.kind) && intervalClassOfKind[g.kind] !== 'textile');
  const items: PreuseItem[] = [];
  if (gated.length) items.push({ key: 'connectors_locked', label: `Gate closed and locked on ${list(gated.map(describeGear))}` });
  if (textiles.length) items.push({ key: 'textile_unworn', label: `No cuts, burns, snags or pulled threads on ${list(textiles.map(describeGear))}` });
  if (swivels.length) items.push({ key: 'swivel_turning', label: `${list(swivels.map(describeGear))} turns freely, without grinding or play` });
  if (hardApparatus.length) items.push({ key: 'apparatus_sound', label: `${list(hardApparatus.map(describeGear))}: no cracks or bends; fittings tight` });
  if (connectors.length) items.push({ key: 'basket_clear', label: 'Nothing wide sits past halfway in a connector’s basket', notApplicable: true });
  // A path of only a clamp and a sling, say, still gets its textile row; an empty path one row.
  if (!items.length) items.push({ key: 'apparatus_sound', label: 'The rigging looks as it should: nothing loose, bent or damaged' });
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
