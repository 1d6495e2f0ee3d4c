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

/** What a rigger looks for on one link, in words that fit the item (no gate asked of a clamp or a swivel). */
function whatToLookFor(gear: LinkInput['gear']): string {
  if (gear.kind === 'fabric') return 'no cuts, burns, holes, runs or pulled threads; no thin, stiff or discoloured patches; rigging point knot or loop sound';
  if (gear.kind === 'trapeze') return 'bar straight, uncracked and tight in its fittings; ropes or cables without cuts, burns, abrasion or kinks; loops and thimbles secure';
  if (intervalClassOfKind[gear.kind] === 'textile') return 'no cuts, burns, holes, abrasion exposing core yarns, knots or missing tag';
  if (gear.kind === 'swivel') return 'no cracks, distortion or corrosion; turns freely without grinding or play; bolt and keeper secure';
  if (isConnectorKind(gear.kind) && gear.gate !== 'none') return 'no cracks, distortion, wear grooves or corrosion; gate opens, closes and locks; sleeve turns freely';
  if (isConnectorKind(gear.kind)) return 'no cracks, distortion, wear grooves or corrosion; pin or bolt fully home and secured';
  return 'no cracks, distortion or corrosion; bolts and fixings tight, seated as fitted';
}

/**
 * The periodic inspection form for a point, built from its load path (PRODUCT.md §3, §4.3):
 * the structure, one row per link, then the standing items every inspection repeats.
 */
export function inspectionChecklist(point: { structure: Structure }, links: LinkInput[]): ChecklistItem[] {
  const items: ChecklistItem[] = [
    { key: 'structure', label: `Structure (${structureLabel[point.structure]}): sound, no cracks, distortion or movement; fixing as the engineer’s assessment describes` },
  ];
  for (const link of links) {
    items.push({ key: `link:${link.gear.id}`, gearId: link.gear.id, label: `${describeGear(link.gear)}: ${whatToLookFor(link.gear)}` });
  }
  const angles = [...new Set(links.map((l) => l.includedAngleDeg).filter((a): a is number => a !== null))];
  if (angles.length) {
    items.push({ key: 'bridle_angle', label: `Bridle legs hang at the included angle the load check used (${angles.map((a) => `${a}°`).join(', ')}); no leg has slipped along the structure` });
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
