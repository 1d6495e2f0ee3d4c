import { gearKindLabels } from '../../../shared/rigging/strength';
import type { Fault } from '../../../shared/schemas/safety';
import type { FaultResolution, Severity } from '../../../shared/schemas/vocabulary';

/** Plain words for each severity. Every open fault blocks, whatever its severity; severity only says how urgent the repair is. */
export const severityText: Record<Severity, { label: string; explain: string }> = {
  low: { label: 'Low', explain: 'Cosmetic or minor: worth a look at the next inspection (a scuffed sleeve, a faded tag).' },
  medium: { label: 'Medium', explain: 'Could get worse: needs a rigger soon (stiff swivel, small snag in the fabric).' },
  high: { label: 'High', explain: 'Unsafe now: a crack, a gate that will not lock, a cut or burn in a textile, something moved.' },
};

export const resolutionText: Record<FaultResolution, { label: string; explain: string }> = {
  repaired: { label: 'Repaired', explain: 'The problem was fixed and the item stays in use.' },
  replaced: { label: 'Replaced', explain: 'A stock item takes its place in the load path.' },
  retired: { label: 'Retired', explain: 'The item is taken out of use for good.' },
  no_fault_found: { label: 'No fault found', explain: 'A rigger looked and found nothing wrong.' },
};

export const gearKindWord = (kind: string | null | undefined) => (kind ? (gearKindLabels as Record<string, string>)[kind] ?? kind.replace(/_/g, ' ') : 'Gear item');

/** "Point B-2", "Swivel SW-0031 on point B-2": what a fault is about, in words. */
export function faultSubject(f: Pick<Fault, 'pointLabel' | 'gearSerial' | 'gearKind'>): string {
  if (f.gearSerial) return `${gearKindWord(f.gearKind)} ${f.gearSerial}${f.pointLabel ? ` on point ${f.pointLabel}` : ''}`;
  return f.pointLabel ? `Point ${f.pointLabel}` : 'Unknown item';
}
