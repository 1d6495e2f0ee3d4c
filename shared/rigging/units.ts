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
