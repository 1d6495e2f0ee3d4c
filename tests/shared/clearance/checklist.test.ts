import { describe, expect, it } from 'vitest';
import { inspectionChecklist } from '../../../shared/clearance';
import type { LinkInput, RatedGear } from '../../../shared/rigging/types';
import type { GearKind } from '../../../shared/schemas/vocabulary';

function link(id: number, kind: GearKind, o: Partial<RatedGear> = {}, l: Partial<LinkInput> = {}): LinkInput {
  const gear: RatedGear = { id, kind, material: 'steel', gate: 'none', serial: `S-${id}`, majorKn: 30, minorKn: null, gateOpenKn: null, wllKn: null, multiDirectional: false, ...o };
  return { gear, mode: 'major', threeWay: false, basketOverHalf: false, leg: null, includedAngleDeg: null, ...l };
}

const rowFor = (items: Array<{ key: string; label: string }>, id: number) => items.find((i) => i.key === `link:${id}`)!.label;

describe('inspectionChecklist: each row in words that fit the item', () => {
  const items = inspectionChecklist({ structure: 'beam' }, [
    link(1, 'beam_clamp'),
    link(2, 'round_sling', { material: 'polyester' }),
    link(3, 'carabiner', { gate: 'screw' }),
    link(4, 'swivel'),
    link(5, 'fabric', { material: 'nylon' }),
  ]);

  it('asks the gate question of a gated connector only, never of a swivel or a beam clamp', () => {
    expect(rowFor(items, 3)).toMatch(/gate opens, closes and locks/);
    expect(rowFor(items, 4)).not.toMatch(/gate/);
    expect(rowFor(items, 4)).toMatch(/turns freely/);
    expect(rowFor(items, 1)).not.toMatch(/gate/);
  });

  it('uses fabric wording for fabric, and round-sling wording for the sling', () => {
    expect(rowFor(items, 5)).toMatch(/runs or pulled threads/);
    expect(rowFor(items, 5)).not.toMatch(/core yarns/);
    expect(rowFor(items, 2)).toMatch(/core yarns/);
  });

  it('has a bridle row only when a link records an included angle, naming it', () => {
    expect(items.some((i) => i.key === 'bridle_angle')).toBe(false);
    const bridled = inspectionChecklist({ structure: 'beam' }, [link(1, 'beam_clamp'), link(2, 'round_sling', {}, { leg: 'a' as LinkInput['leg'], includedAngleDeg: 60 })]);
    expect(bridled.find((i) => i.key === 'bridle_angle')?.label).toMatch(/\(60°\)/);
  });
});
