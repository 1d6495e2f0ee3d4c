import { describe, expect, it } from 'vitest';
import { preuseChecklist, preuseDue, studioDay } from '../../../shared/clearance';
import type { LinkInput, RatedGear } from '../../../shared/rigging/types';
import type { GearKind } from '../../../shared/schemas/vocabulary';

function link(id: number, kind: GearKind): LinkInput {
  const gear: RatedGear = {
    id,
    kind,
    material: 'steel',
    gate: 'screw',
    serial: `S-${id}`,
    majorKn: 30,
    minorKn: null,
    gateOpenKn: null,
    wllKn: null,
    multiDirectional: false,
  };
  return { gear, mode: 'major', threeWay: false, basketOverHalf: false, leg: null, includedAngleDeg: null };
}

const London = 'Europe/London';

describe('preuseChecklist: built from the point’s load path', () => {
  it('asks about the swivel only where the path has one', () => {
    const withSwivel = [link(1, 'beam_clamp'), link(2, 'round_sling'), link(3, 'carabiner'), link(4, 'swivel'), link(5, 'fabric')];
    expect(preuseChecklist(withSwivel).map((i) => i.key)).toEqual(['connectors_locked', 'textile_unworn', 'swivel_turning', 'basket_clear']);
    const withoutSwivel = [link(1, 'beam_clamp'), link(2, 'round_sling'), link(3, 'carabiner'), link(5, 'hoop')];
    expect(preuseChecklist(withoutSwivel).map((i) => i.key)).toEqual(['connectors_locked', 'textile_unworn', 'apparatus_sound', 'basket_clear']);
  });

  it('names what each row is about: the gated connector, the textiles, the swivel, a hardware apparatus', () => {
    const items = preuseChecklist([link(1, 'beam_clamp'), link(2, 'round_sling'), link(3, 'carabiner'), link(4, 'swivel'), link(5, 'fabric')]);
    const label = (key: string) => items.find((i) => i.key === key)!.label;
    expect(label('connectors_locked')).toMatch(/^Gate closed and locked on \S+ S-3$/);
    expect(label('textile_unworn')).toMatch(/^No cuts, burns, snags or pulled threads on .+ S-2 and .+ S-5$/);
    expect(label('swivel_turning')).toMatch(/S-4 turns freely/);
    expect(new Set(items.map((i) => i.key)).size).toBe(items.length);
  });

  it('has no gate row for a swivel or a beam clamp, nor for a connector without a gate', () => {
    const clampAndSwivel = [link(1, 'beam_clamp'), link(4, 'swivel'), link(5, 'hoop')];
    expect(preuseChecklist(clampAndSwivel).map((i) => i.key)).toEqual(['swivel_turning', 'apparatus_sound']);
    const gateless = { ...link(3, 'carabiner'), gear: { ...link(3, 'carabiner').gear, gate: 'none' as const } };
    expect(preuseChecklist([gateless]).map((i) => i.key)).toEqual(['basket_clear']);
  });

  it('offers “not applicable” on the basket row only', () => {
    const items = preuseChecklist([link(1, 'beam_clamp'), link(2, 'round_sling'), link(3, 'carabiner'), link(5, 'fabric')]);
    expect(items.filter((i) => i.notApplicable).map((i) => i.key)).toEqual(['basket_clear']);
  });

  it('still gives an empty path one row to look at', () => {
    expect(preuseChecklist([]).map((i) => i.key)).toEqual(['apparatus_sound']);
  });
});

describe('studioDay', () => {
  it('reads the day in the studio zone around the March clock change', () => {
    // Clocks go forward at 01:00Z on 30 March 2025.
    expect(studioDay(new Date('2025-03-29T23:30:00Z'), London)).toBe('2025-03-29');
    expect(studioDay(new Date('2025-03-30T00:30:00Z'), London)).toBe('2025-03-30');
    expect(studioDay(new Date('2025-03-30T23:30:00Z'), London)).toBe('2025-03-31');
  });

  it('reads the day in the studio zone around the October clock change', () => {
    // Clocks go back at 01:00Z on 26 October 2025.
    expect(studioDay(new Date('2025-10-25T23:30:00Z'), London)).toBe('2025-10-26');
    expect(studioDay(new Date('2025-10-26T23:30:00Z'), London)).toBe('2025-10-26');
    expect(studioDay(new Date('2025-10-27T00:00:00Z'), London)).toBe('2025-10-27');
  });

  it('differs from the UTC day in a zone far from UTC', () => {
    expect(studioDay(new Date('2025-06-01T20:00:00Z'), 'Pacific/Auckland')).toBe('2025-06-02');
    expect(studioDay(new Date('2025-06-01T02:00:00Z'), 'America/Los_Angeles')).toBe('2025-05-31');
  });
});

describe('preuseDue', () => {
  it('is due when there has never been a pre-use check', () => {
    expect(preuseDue(null, new Date('2025-06-02T09:00:00Z'), London)).toBe(true);
  });

  it('is not due after a check earlier the same studio day', () => {
    expect(preuseDue(new Date('2025-06-02T07:00:00Z'), new Date('2025-06-02T19:00:00Z'), London)).toBe(false);
  });

  it('is due again on the next studio day', () => {
    expect(preuseDue(new Date('2025-06-02T07:00:00Z'), new Date('2025-06-03T07:00:00Z'), London)).toBe(true);
  });

  it('counts a check made at 00:30 BST on 31 March as that day, though it is still 30 March in UTC', () => {
    const check = new Date('2025-03-30T23:30:00Z');
    expect(preuseDue(check, new Date('2025-03-31T09:00:00Z'), London)).toBe(false);
  });

  it('splits days at local midnight on the day the clocks go forward', () => {
    // 23:30 GMT on the 29th, then 00:30 GMT (still before the change) on the 30th: two studio days.
    expect(preuseDue(new Date('2025-03-29T23:30:00Z'), new Date('2025-03-30T00:30:00Z'), London)).toBe(true);
    // Both on 30 March local time, either side of the change.
    expect(preuseDue(new Date('2025-03-30T00:30:00Z'), new Date('2025-03-30T22:30:00Z'), London)).toBe(false);
  });

  it('splits days at local midnight on the day the clocks go back', () => {
    // 23:30Z on the 25th is 00:30 BST on the 26th; 23:30Z on the 26th is 23:30 GMT the same day.
    expect(preuseDue(new Date('2025-10-25T23:30:00Z'), new Date('2025-10-26T23:30:00Z'), London)).toBe(false);
    expect(preuseDue(new Date('2025-10-25T22:30:00Z'), new Date('2025-10-25T23:30:00Z'), London)).toBe(true);
  });
});
