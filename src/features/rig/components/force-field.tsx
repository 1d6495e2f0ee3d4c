import { forwardRef, type InputHTMLAttributes } from 'react';
import { formatForce, toKn } from '../../../../shared/rigging';
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

export function ForceUnitToggle({ unit, onChange }: { unit: ForceUnit; onChange: (u: ForceUnit) => void }) {
  return <ChoiceGroup legend="Figures typed in" value={unit} options={FORCE_UNITS} onChange={onChange} />;
}

/** A force typed in `unit`, with what will be stored (kN) shown under it as it is typed. */
export const ForceField = forwardRef<HTMLInputElement, InputHTMLAttributes<HTMLInputElement> & { label: string; unit: ForceUnit; typed: string | undefined; error?: string; optionalHint?: string }>(
  function ForceField({ label, unit, typed, error, optionalHint, ...rest }, ref) {
    const kn = typedToKn(typed, unit);
    const hint =
      kn === null ? optionalHint : Number.isNaN(kn) ? 'Type a plain number, such as 22 or 4950 (no commas).' : unit === 'kN' ? `Stored as ${formatForce(kn, 'kN', 2)}.` : `Stored as ${formatForce(kn, 'kN', 2)} (from ${typed?.trim()} ${unit}).`;
    return <TextField ref={ref} label={`${label} (${unit})`} inputMode="decimal" autoComplete="off" hint={hint} error={error} {...rest} />;
  },
);
