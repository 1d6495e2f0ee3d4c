import type { ForceUnit } from '../schemas/vocabulary';

/** Standard gravity in m/s², exact by definition. */
export const G = 9.80665;

/** Newtons in one pound-force: 0.45359237 kg × 9.80665 m/s², exact (PRODUCT.md §4.2). */
export const LBF_IN_N = 4.4482216152605;

/** Newtons in one kilogram-force: 1 kg × standard gravity, exact. */
export const KGF_IN_N = 9.80665;

const NEWTONS_PER_UNIT: Record<ForceUnit, number> = {
  kN: 1000,
  lbf: LBF_IN_N,
  kgf: KGF_IN_N,
};

/** Converts a force given in `unit` to kN, the unit everything is stored in. */
export function toKn(value: number, unit: ForceUnit): number {
  if (unit === 'kN') return value;
  return (value * NEWTONS_PER_UNIT[unit]) / 1000;
}

/** Converts a force in kN to `unit`, for display. */
export function fromKn(kn: number, unit: ForceUnit): number {
  if (unit === 'kN') return kn;
  return (kn * 1000) / NEWTONS_PER_UNIT[unit];
}

/** Digits after the point by unit: kN figures are small, lbf and kgf figures are in the thousands. */
const DEFAULT_DIGITS: Record<ForceUnit, number> = { kN: 1, lbf: 0, kgf: 0 };

/** Groups the integer part in threes with commas, independent of the runtime's locale. */
function groupThousands(digits: string): string {
  return digits.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}

/**
 * A force in kN shown in `unit`: `12.5 kN`, `2,810 lbf`, `1,020 kgf`.
 * Formatting is our own rather than Intl's so that server mail and the client read the same.
 */
export function formatForce(kn: number, unit: ForceUnit, digits: number = DEFAULT_DIGITS[unit]): string {
  const value = fromKn(kn, unit);
  if (!Number.isFinite(value)) return `— ${unit}`;
  const places = Math.max(0, Math.min(6, Math.floor(digits)));
  const fixed = Math.abs(value).toFixed(places);
  const [whole, fraction] = fixed.split('.');
  const isZero = Number(fixed) === 0;
  const sign = value < 0 && !isZero ? '-' : '';
  return `${sign}${groupThousands(whole)}${fraction ? `.${fraction}` : ''} ${unit}`;
}
