import { SCREW_GATE_CHECKLIST_ITEM, describeGear } from '../rigging';
import { intervalClassOfKind, isConnectorKind, type Structure } from '../schemas/vocabulary';
import type { LinkInput } from '../rigging/types';

export interface ChecklistItem {
  key: string;
  label: string;
  /** The gear item a row is about; a failed row opens a fault on it. */
  gearId?: number;
}

const structureLabel: Record<Structure, string> = { beam: 'beam', truss: 'truss', ceiling_anchor: 'ceiling anchor', frame: 'freestanding frame' };

/**
 * The periodic inspection form for a point, built from its load path (PRODUCT.md §3, §4.3):
 * the structure, one row per link, then the standing items every inspection repeats.
 */
export function inspectionChecklist(point: { structure: Structure }, links: LinkInput[]): ChecklistItem[] {
  const items: ChecklistItem[] = [
    { key: 'structure', label: `Structure (${structureLabel[point.structure]}): sound, no cracks, distortion or movement; fixing as the engineer’s assessment describes` },
  ];
  for (const link of links) {
    const textile = intervalClassOfKind[link.gear.kind] === 'textile';
    const what = textile ? 'no cuts, burns, holes, abrasion exposing core yarns, knots or missing tag' : 'no cracks, distortion, wear grooves or corrosion; gate and sleeve work';
    items.push({ key: `link:${link.gear.id}`, gearId: link.gear.id, label: `${describeGear(link.gear)}: ${what}` });
  }
  items.push({ key: SCREW_GATE_CHECKLIST_ITEM.key, label: SCREW_GATE_CHECKLIST_ITEM.label });
  items.push({ key: 'basket_not_overfilled', label: 'No wide material sits past the halfway point of a carabiner’s basket' });
  if (links.some((l) => isConnectorKind(l.gear.kind))) {
    items.push({ key: 'no_three_way_on_carabiner', label: 'No carabiner takes a three-way load (tri or delta screw link, or a swivel base rated for it)' });
  }
  if (links.some((l) => intervalClassOfKind[l.gear.kind] === 'textile')) {
    items.push({ key: 'textile_removal_criteria', label: 'Textiles meet none of the removal criteria: missing tag, acid or caustic burns, heat damage, holes, tears, cuts, snags exposing core yarns, broken core yarns, weld spatter, knots, damaged fittings' });
  }
  return items;
}
