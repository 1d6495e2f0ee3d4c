import { ChoiceGroup } from '../../../components/ui/choice-group';

export type Scope = 'this' | 'following';
export const scopeOptions = [
  { value: 'this', label: 'This class only' },
  { value: 'following', label: 'This and the following' },
] as const satisfies readonly { value: Scope; label: string }[];

/** Shown only for a class from a series: whether a change applies to this one or the rest too. */
export function ScopeChoice({ seriesId, value, onChange, legend = 'Apply to' }: { seriesId: number | null; value: Scope; onChange: (s: Scope) => void; legend?: string }) {
  if (!seriesId) return null;
  return <ChoiceGroup legend={legend} value={value} options={scopeOptions} onChange={onChange} />;
}

export const MAIL_NOTE = 'The instructor is e-mailed about the change.';
