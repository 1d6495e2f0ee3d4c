import { forwardRef, useRef, useState, type InputHTMLAttributes } from 'react';
import { forceInputText, formatForce, toKn } from '../../../../shared/rigging';
import type { ForceUnit } from '../../../../shared/schemas/vocabulary';
import { TextField } from '../../../components/ui/field';
import { ChoiceGroup } from '../../../components/ui/choice-group';
import { numberOrNull } from '../form-helpers';

export const FORCE_UNITS: readonly { value: ForceUnit; label: string }[] = [
  { value: 'kN', label: 'kN' },
  { value: 'lbf', label: 'lbf' },
  { value: 'kgf', label: 'kgf' },
];

/** The typed figure in kN, or null / NaN as numberOrNull reads it. */
export function typedToKn(text: string | undefined, unit: ForceUnit): number | null {
  const n = numberOrNull(text);
  return n === null || Number.isNaN(n) ? n : toKn(n, unit);
}

interface Exact {
  text: string;
  kn: number;
}

/**
 * The unit a form's force fields are typed in (PRODUCT.md §4.8). Stored figures open in the
 * studio's display unit; switching the unit converts every typed figure (5000 lbf → 22.24 kN),
 * never relabels it. A figure the form wrote itself (on opening or on a switch) is remembered with
 * the exact kN it stands for, so an untouched rating saves exactly as stored, however often the
 * unit was switched; a figure the person typed is read in the unit shown.
 */
export function useForceUnits<N extends string>(initialUnit: ForceUnit, storedKn: Record<N, number | null | undefined>) {
  const [start] = useState(() => {
    const exact = new Map<N, Exact>();
    const texts = {} as Record<N, string>;
    for (const name of Object.keys(storedKn) as N[]) {
      const kn = storedKn[name];
      texts[name] = kn == null ? '' : forceInputText(kn, initialUnit);
      if (kn != null) exact.set(name, { text: texts[name], kn });
    }
    return { exact, texts };
  });
  const [unit, setUnit] = useState<ForceUnit>(initialUnit);
  const unitRef = useRef(unit);
  const exact = start.exact;

  /** The figure in a field, in kN: exact when the form wrote it, else as typed in the current unit. */
  const knOf = (name: N, text: string | undefined): number | null => {
    const known = exact.get(name);
    if (known && known.text === (text ?? '').trim()) return known.kn;
    return typedToKn(text, unitRef.current);
  };

  /** Converts every field's figure to `next` and shows it in that unit; a blank or unreadable field is left as typed. */
  const switchTo = (next: ForceUnit, get: (name: N) => string | undefined, set: (name: N, text: string) => void) => {
    if (next === unitRef.current) return;
    for (const name of Object.keys(storedKn) as N[]) {
      const kn = knOf(name, get(name));
      if (kn === null || Number.isNaN(kn)) continue;
      const text = forceInputText(kn, next);
      exact.set(name, { text, kn });
      set(name, text);
    }
    unitRef.current = next;
    setUnit(next);
  };

  return { unit, unitRef, initialTexts: start.texts, knOf, switchTo };
}

export function ForceUnitToggle({ unit, onChange }: { unit: ForceUnit; onChange: (u: ForceUnit) => void }) {
  return <ChoiceGroup legend="Figures typed in" value={unit} options={FORCE_UNITS} onChange={onChange} />;
}

/** A force typed in `unit`, with what will be stored (kN) shown under it as it is typed. */
export const ForceField = forwardRef<HTMLInputElement, InputHTMLAttributes<HTMLInputElement> & { label: string; unit: ForceUnit; typed: string | undefined; kn: number | null; error?: string; optionalHint?: string }>(
  function ForceField({ label, unit, typed, kn, error, optionalHint, ...rest }, ref) {
    const hint =
      kn === null ? optionalHint : Number.isNaN(kn) ? 'Type a plain number, such as 22 or 4950 (no commas).' : unit === 'kN' ? `Stored as ${formatForce(kn, 'kN', 2)}.` : `Stored as ${formatForce(kn, 'kN', 2)} (from ${typed?.trim()} ${unit}).`;
    return <TextField ref={ref} label={`${label} (${unit})`} inputMode="decimal" autoComplete="off" hint={hint} error={error} {...rest} />;
  },
);
