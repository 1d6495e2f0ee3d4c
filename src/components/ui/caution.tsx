import { ShieldAlert } from 'lucide-react';

/** PRODUCT.md §8: shown wherever a strength, a factor or a clearance is shown. */
export const CAUTION_TEXT =
  'Figures come from the ratings entered and the rules configured. They do not replace inspection by a qualified rigger, the maker’s instructions, an engineer’s assessment of the structure, or local codes and licensed practice.';

export function Caution({ className = '' }: { className?: string }) {
  return (
    <p className={`flex items-start gap-2 rounded-lg bg-sand-100 px-3 py-2 text-xs text-ink ${className}`} data-testid="safety-caution">
      <ShieldAlert className="mt-0.5 size-4 shrink-0 text-warn-700" aria-hidden />
      <span>{CAUTION_TEXT}</span>
    </p>
  );
}
