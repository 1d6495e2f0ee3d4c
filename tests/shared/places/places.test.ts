import { describe, expect, it } from 'vitest';
import { choosePoint, pointRefusal, sessionCapacity, studentMayCancel, waitlistOrder, waiverStateAt, waiverValidUntil } from '../../../shared/places';

describe('place rules (PRODUCT.md §11)', () => {
  it('capacity is the lesser of the class capacity and performersPerPoint × usable points; a cancelled class takes no one', () => {
    expect(sessionCapacity({ classCapacity: 8, performersPerPoint: 2, usablePoints: 3 })).toBe(6);
    expect(sessionCapacity({ classCapacity: 5, performersPerPoint: 2, usablePoints: 3 })).toBe(5);
    expect(sessionCapacity({ classCapacity: 5, performersPerPoint: 2, usablePoints: 0 })).toBe(0);
    expect(sessionCapacity({ classCapacity: 5, performersPerPoint: 2, usablePoints: 3, cancelled: true })).toBe(0);
  });

  it('places a student on the usable point with the fewest students, never past a point’s places or the capacity', () => {
    const points = [
      { pointId: 1, label: 'A', usable: true, taken: 1 },
      { pointId: 2, label: 'B', usable: false, taken: 0 },
      { pointId: 3, label: 'C', usable: true, taken: 0 },
    ];
    expect(choosePoint(points, 2, 10)).toBe(3);
    expect(choosePoint(points.map((p) => ({ ...p, taken: 2 })), 2, 10)).toBeNull();
    expect(choosePoint(points, 2, 1)).toBeNull();
    expect(pointRefusal(points[1], 2)?.code).toBe('point_unavailable');
    expect(pointRefusal({ ...points[0], taken: 2 }, 2)?.code).toBe('point_full');
    expect(pointRefusal(undefined, 2)?.code).toBe('point_not_in_session');
  });

  it('orders the waitlist by when each joined, then by id', () => {
    const rows = [
      { id: 3, waitlistedAt: '2026-12-01T10:00:00.000Z' },
      { id: 1, waitlistedAt: '2026-12-01T10:05:00.000Z' },
      { id: 2, waitlistedAt: '2026-12-01T10:00:00.000Z' },
    ];
    expect(waitlistOrder(rows).map((r) => r.id)).toEqual([2, 3, 1]);
  });

  it('a waiver holds whole calendar months, to the month’s last day where the day does not exist', () => {
    expect(waiverValidUntil(new Date('2026-12-01T10:00:00Z'), 12).toISOString()).toBe('2027-12-01T10:00:00.000Z');
    expect(waiverValidUntil(new Date('2027-01-31T09:00:00Z'), 1).toISOString()).toBe('2027-02-28T09:00:00.000Z');
    expect(waiverValidUntil(new Date('2028-01-31T09:00:00Z'), 1).toISOString()).toBe('2028-02-29T09:00:00.000Z');
    const until = { validUntil: '2027-12-01T10:00:00.000Z' };
    expect(waiverStateAt(until, new Date('2027-12-01T09:59:59Z'))).toBe('valid');
    expect(waiverStateAt(until, new Date('2027-12-01T10:00:00Z'))).toBe('expired');
    expect(waiverStateAt(null, new Date())).toBe('missing');
  });

  it('a student may cancel up to the cut-off before the class', () => {
    const start = new Date('2026-12-03T18:00:00Z');
    expect(studentMayCancel(start, new Date('2026-12-03T06:00:00Z'), 12)).toBe(true);
    expect(studentMayCancel(start, new Date('2026-12-03T06:00:01Z'), 12)).toBe(false);
  });
});
