import { describe, expect, it } from 'vitest';
import { gearInspectionsNeeded, gearStandingAt, pointInspectionHelps, type GearStandingInput } from '../../../shared/clearance/gear-standing';

const at = new Date('2026-12-02T10:00:00Z');
const inService: GearStandingInput = { status: 'in_service', inspectedUntil: '2027-01-01T00:00:00Z', serviceLifeEndsOn: '2030-01-01T00:00:00Z' };

describe('gearStandingAt: an item recorded as in service is only "in service" when nothing else stands in its way', () => {
  it('reads the recorded status first', () => {
    expect(gearStandingAt({ ...inService, status: 'retired' }, at)).toBe('retired');
    expect(gearStandingAt({ ...inService, status: 'quarantined', inspectedUntil: null }, at)).toBe('quarantined');
  });

  it('says past its service life, never inspected or inspection lapsed, never "in service"', () => {
    expect(gearStandingAt({ ...inService, serviceLifeEndsOn: '2026-12-02T00:00:00Z' }, at)).toBe('past_service_life');
    expect(gearStandingAt({ ...inService, inspectedUntil: null }, at)).toBe('never_inspected');
    expect(gearStandingAt({ ...inService, inspectedUntil: '2026-12-02T10:00:00Z' }, at)).toBe('inspection_lapsed');
    expect(gearStandingAt(inService, at)).toBe('in_service');
    expect(gearStandingAt({ ...inService, serviceLifeEndsOn: null }, at)).toBe('in_service');
  });
});

describe('gearInspectionsNeeded and pointInspectionHelps: what releases a blocked point', () => {
  const gear = (id: number, kind: 'carabiner' | 'hoop', o: Partial<GearStandingInput> = {}) => ({ gear: { id, kind, serial: `S-${id}`, ...inService, ...o } });

  it('sends a quarantined item anywhere in the path to its after-incident inspection, and a never-inspected apparatus to its own', () => {
    expect(gearInspectionsNeeded([gear(1, 'carabiner', { status: 'quarantined' }), gear(2, 'hoop', { inspectedUntil: null })], at)).toEqual([
      { gearId: 1, kind: 'carabiner', serial: 'S-1', inspection: 'after_incident', standing: 'quarantined' },
      { gearId: 2, kind: 'hoop', serial: 'S-2', inspection: 'periodic', standing: 'never_inspected' },
    ]);
  });

  it('asks nothing of a fixed link that was never inspected on its own (the point’s clearance covers it) or of a retired item (it is replaced)', () => {
    expect(gearInspectionsNeeded([gear(1, 'carabiner', { inspectedUntil: null }), gear(2, 'hoop', { status: 'retired' })], at)).toEqual([]);
  });

  it('offers the point inspection only where it helps: not for a point blocked by quarantined gear alone', () => {
    expect(pointInspectionHelps({ status: 'blocked', reasons: [{ code: 'gear_unfit', message: 'Hoop HP-1 is quarantined' }] })).toBe(false);
    expect(pointInspectionHelps({ status: 'blocked', reasons: [{ code: 'gear_unfit', message: 'x' }, { code: 'awaiting_clearance', message: 'y' }] })).toBe(true);
    expect(pointInspectionHelps({ status: 'blocked', reasons: [{ code: 'inspection_lapsed', message: 'y' }] })).toBe(true);
    expect(pointInspectionHelps({ status: 'cleared', reasons: [] })).toBe(true);
  });
});
