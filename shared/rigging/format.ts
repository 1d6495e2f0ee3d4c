import type { ForceUnit } from '../schemas/vocabulary';
import { fromKn } from './units';

/**
 * Figures shown honestly (PRODUCT.md §4.8): a figure is cut toward the unsafe side, never rounded
 * across a requirement. What the product computes or counts on — an achieved factor, a strength,
 * a rating, a structural or working load limit — is cut down; what it must withstand — a design
 * load, a load on a link — is cut up; a required factor, a requirement, is cut up. So a failing
 * check never reads as meeting its requirement: 4.996 against 5 reads "4.99 ×".
 *
 * The same functions serve the client, the e-mail (whose reasons are written by the shared rules)
 * and every export, so a figure reads the same wherever it is shown.
 */
export type Toward = 'down' | 'up';

/**
 * `value` with `places` decimals, never past `value` in the direction given: 'down' never shows
 * more than `value`, 'up' never less. A decimal that reads back as exactly `value` (1.15 is the
 * double nearest 1.15) is kept, so entered figures show as entered.
 */
export function fixedToward(value: number, places: number, toward: Toward): string {
  if (!Number.isFinite(value)) return '—';
  const p = Math.max(0, Math.min(6, Math.floor(places)));
  let text = value.toFixed(p);
  const shown = Number(text);
  const crosses = toward === 'down' ? shown > value : shown < value;
  if (crosses) {
    const scale = 10 ** p;
    const step = toward === 'down' ? -1 : 1;
    text = ((Math.round(shown * scale) + step) / scale).toFixed(p);
  }
  // "-0.00" reads as a negative figure; it is zero.
  return Number(text) === 0 ? (0).toFixed(p) : text;
}

/** Drops trailing zeros of the decimals: "5.00" → "5", "4.50" → "4.5". The value is unchanged. */
function trimZeros(text: string): string {
  return text.includes('.') ? text.replace(/\.?0+$/, '') : text;
}

/** Groups the integer part in threes with commas, independent of the runtime's locale. */
function groupThousands(text: string): string {
  const [whole, fraction] = text.split('.');
  const sign = whole.startsWith('-') ? '-' : '';
  const digits = sign ? whole.slice(1) : whole;
  return `${sign}${digits.replace(/\B(?=(\d{3})+(?!\d))/g, ',')}${fraction !== undefined ? `.${fraction}` : ''}`;
}

/** Decimals for a factor: two, as a rigger reads "4.99 ×". */
export const FACTOR_PLACES = 2;

/**
 * An achieved factor (chain strength ÷ design load), cut down to two decimals without trailing
 * zeros: 4.996 → "4.99", 5 → "5", 8.9024 → "8.9". Null or not finite → "—".
 */
export function formatFactor(factor: number | null | undefined): string {
  if (factor == null || !Number.isFinite(factor)) return '—';
  return trimZeros(fixedToward(factor, FACTOR_PLACES, 'down'));
}

/** A required factor, cut up: a requirement never reads lower than it is. */
export function formatRequiredFactor(factor: number | null | undefined): string {
  if (factor == null || !Number.isFinite(factor)) return '—';
  return trimZeros(fixedToward(factor, FACTOR_PLACES, 'up'));
}

/** Digits after the point by unit: kN figures are small, lbf and kgf figures are in the thousands. */
export const FORCE_PLACES: Record<ForceUnit, number> = { kN: 1, lbf: 0, kgf: 0 };

function formatForceToward(kn: number, unit: ForceUnit, places: number, toward: Toward): string {
  const value = fromKn(kn, unit);
  if (!Number.isFinite(value)) return `— ${unit}`;
  return `${groupThousands(fixedToward(value, places, toward))} ${unit}`;
}

/**
 * A strength, rating or limit stored in kN, shown in `unit` and cut down: `12.5 kN`, `2,810 lbf`,
 * `1,020 kgf`. Formatting is our own rather than Intl's so that mail and the client read the same.
 */
export function formatForce(kn: number, unit: ForceUnit, places: number = FORCE_PLACES[unit]): string {
  return formatForceToward(kn, unit, places, 'down');
}

/** A load the rigging must carry (design load, load on a link), shown in `unit` and cut up. */
export function formatLoad(kn: number, unit: ForceUnit, places: number = FORCE_PLACES[unit]): string {
  return formatForceToward(kn, unit, places, 'up');
}

/**
 * Which way a figure of the load check's working is cut, by its name: loads (design load, load on
 * a link, leg tension) up; strengths, ratings, capacities and factors down; the required factor up.
 */
const UP_INPUTS = new Set(['designLoadKn', 'loadKn', 'legShare', 'loadShare', 'requiredFactor', 'dynamicFactor', 'bodyMassKg']);
const UP_STEPS = new Set(['design_load', 'bridle_leg_tension']);

/**
 * Which way a figure of the load check's working is cut: what the rigging must carry (design load,
 * load on a link, leg tension and the shares and profile figures behind them) and the required
 * factor up; strengths, ratings, capacities and the achieved factor down. `input` is the name of
 * an input, or null for the step's result.
 */
export function workingFigureToward(step: string, input: string | null): Toward {
  if (input === null) return UP_STEPS.has(step) ? 'up' : 'down';
  return UP_INPUTS.has(input) ? 'up' : 'down';
}

/** Decimals a force field shows when it opens or its unit is switched: 5000 lbf reads 22.24 kN. */
export const FORCE_INPUT_PLACES: Record<ForceUnit, number> = { kN: 2, lbf: 1, kgf: 1 };

/**
 * A force stored in kN as a form field shows it in `unit`: cut down (a rating never reads above
 * its marking), without grouping or trailing zeros, so it can be typed over and read back.
 */
export function forceInputText(kn: number, unit: ForceUnit): string {
  const value = fromKn(kn, unit);
  if (!Number.isFinite(value)) return '';
  // A conversion's last-bit noise (5000 lbf → kN → 4999.999999999999 lbf) is not a figure to cut:
  // the field shows the marking. The exact kN behind the field is kept by the form (useForceUnits).
  const places = FORCE_INPUT_PLACES[unit];
  const nearest = Number(value.toFixed(places));
  const figure = Math.abs(value - nearest) <= 1e-9 * Math.abs(value) ? nearest : value;
  return trimZeros(fixedToward(figure, places, 'down'));
}
