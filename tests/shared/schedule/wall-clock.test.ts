import { describe, expect, it } from 'vitest';
import { instantOfFloating, shiftWallClock, wallClockDelta } from '../../../shared/schedule/wall-clock';

const LONDON = 'Europe/London';
const DAY = 86_400_000;

describe('wall-clock arithmetic in the studio’s zone (Europe/London leaves BST on 25 Oct 2026)', () => {
  it('moves an 18:00 class a week on to 18:00, across the clock change, not to 17:00', () => {
    // 21 Oct 18:00 BST = 17:00Z; 28 Oct 18:00 GMT = 18:00Z.
    expect(shiftWallClock(new Date('2026-10-21T17:00:00Z'), 7 * DAY, LONDON).toISOString()).toBe('2026-10-28T18:00:00.000Z');
  });

  it('measures a move from Saturday 18:00 to Sunday 18:00 as one wall-clock day, though 25 hours pass', () => {
    expect(wallClockDelta(new Date('2026-10-24T17:00:00Z'), new Date('2026-10-25T18:00:00Z'), LONDON)).toBe(DAY);
  });

  it('takes the first of two 01:30s on the night the clocks go back [published: RFC 5545 §3.3.5]', () => {
    expect(instantOfFloating(Date.UTC(2026, 9, 25, 1, 30), LONDON).toISOString()).toBe('2026-10-25T00:30:00.000Z');
  });
});
