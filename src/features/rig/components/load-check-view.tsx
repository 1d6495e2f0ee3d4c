import { CircleCheck, OctagonX, TriangleAlert } from 'lucide-react';
import type { LoadCheck } from '../../../../shared/schemas/rig';
import { Caution } from '../../../components/ui/caution';
import { fixedToward, formatForce, formatLoad, workingFigureToward, type Toward } from '../../../../shared/rigging';
import { formatFactor, formatRequiredFactor, type StudioFormat } from '../format';

export function PassWord({ pass }: { pass: boolean }) {
  return pass ? (
    <span className="inline-flex items-center gap-1.5 rounded-full border border-ok-700/30 bg-ok-50 px-2.5 py-0.5 text-sm font-medium text-ok-700">
      <CircleCheck className="size-4" aria-hidden /> Passes
    </span>
  ) : (
    <span className="inline-flex items-center gap-1.5 rounded-full border border-stop-700/30 bg-stop-50 px-2.5 py-0.5 text-sm font-medium text-stop-700">
      <OctagonX className="size-4" aria-hidden /> Fails
    </span>
  );
}

/** The figures, findings and full working of one load check (server's or the client's preview). */
export function LoadCheckView({ check, fmt, compact = false }: { check: LoadCheck; fmt: StudioFormat; compact?: boolean }) {
  return (
    <div className="space-y-3">
      <dl className="grid gap-3 text-sm sm:grid-cols-4">
        <Figure term="Chain strength" value={check.chainStrengthKn === null ? 'Cannot be worked out' : fmt.force(check.chainStrengthKn)} />
        <Figure term="Design load" value={formatForceFine(check.designLoadKn, fmt)} />
        <Figure
          term="Factor achieved"
          value={check.achievedFactor === null ? '—' : `${formatFactor(check.achievedFactor)} ×`}
          note={`Studio requires ${formatRequiredFactor(check.requiredFactor)} ×`}
          reason={check.requiredFactorReason}
        />
        <Figure term="Structural rating" value={fmt.force(check.structuralRatingKn)} note={check.designLoadKn <= check.structuralRatingKn ? 'Design load is within it' : 'Design load is above it'} />
      </dl>
      <Findings check={check} />
      {compact ? null : <WorkingTable check={check} fmt={fmt} />}
      <Caution />
    </div>
  );
}

function Figure({ term, value, note, reason }: { term: string; value: string; note?: string; reason?: string | null }) {
  return (
    <div className="rounded-lg bg-pine-50 px-3 py-2">
      <dt className="text-xs text-muted">{term}</dt>
      <dd className="text-base font-semibold">{value}</dd>
      {note ? <dd className="text-xs text-muted">{note}</dd> : null}
      {reason ? <FactorReason reason={reason} /> : null}
    </div>
  );
}

/** The owner's reason for a required factor below 5, beside the factor wherever a load check shows it. */
export function FactorReason({ reason }: { reason: string }) {
  return (
    <dd className="mt-1 text-xs text-warn-700" data-testid="factor-reason">
      <span className="font-semibold">Below 5 × because:</span> {reason}
    </dd>
  );
}

/** "factor 4.99 × of 5 × required", with the owner's reason for a factor below 5 beside it. */
export function FactorSummary({ check }: { check: Pick<LoadCheck, 'achievedFactor' | 'requiredFactor' | 'requiredFactorReason'> }) {
  return (
    <span className="text-sm text-muted">
      factor {formatFactor(check.achievedFactor)} × of {formatRequiredFactor(check.requiredFactor)} × required
      {check.requiredFactorReason ? <span className="text-warn-700"> (below 5 × because: {check.requiredFactorReason})</span> : null}
    </span>
  );
}

export function Findings({ check }: { check: Pick<LoadCheck, 'violations' | 'warnings'> }) {
  if (check.violations.length === 0 && check.warnings.length === 0) return <p className="text-sm text-muted">No rule is broken and there are no warnings.</p>;
  return (
    <ul className="space-y-2 text-sm">
      {check.violations.map((f, i) => (
        <li key={`v${i}`} className="flex items-start gap-2 text-stop-700">
          <OctagonX className="mt-0.5 size-4 shrink-0" aria-hidden />
          <span><span className="font-semibold">Fails:</span> {f.message}</span>
        </li>
      ))}
      {check.warnings.map((f, i) => (
        <li key={`w${i}`} className="flex items-start gap-2 text-warn-700">
          <TriangleAlert className="mt-0.5 size-4 shrink-0" aria-hidden />
          <span><span className="font-semibold">Warning:</span> {f.message}</span>
        </li>
      ))}
    </ul>
  );
}

/** A design load is a load: cut up, two decimals in kN, whole figures otherwise. */
function formatForceFine(kn: number, fmt: StudioFormat) {
  return formatLoad(kn, fmt.unit, fmt.unit === 'kN' ? 2 : 0);
}

/**
 * A figure of the working, cut toward the unsafe side (loads up, strengths and factors down).
 * Results read to four decimals; inputs keep six, so a constant such as standard gravity
 * (9.80665 m/s², exact) reads as the figure the arithmetic used. A force reads in the studio's
 * display unit with kN beside it (PRODUCT.md §4.8).
 */
function figure(value: number | string | null, toward: Toward, fmt: StudioFormat, unit?: string, digits = 4): string {
  if (value === null) return '—';
  if (typeof value === 'string') return value.replace(/_/g, ' ');
  const text = Number.isInteger(value) ? String(value) : String(Number(fixedToward(value, digits, toward)));
  if (unit !== 'kN' || fmt.unit === 'kN') return unit ? `${text} ${unit}` : text;
  const shown = toward === 'up' ? formatLoad(value, fmt.unit, 1) : formatForce(value, fmt.unit, 1);
  return `${shown} (${text} kN)`;
}


/** "majorKn" → "major (kN)", "bodyMassKg" → "body mass (kg)", "link2Kn" → "link 2 (kN)". */
function inputName(key: string): { name: string; unit?: string } {
  const m = /^(.*?)(Kn|Kg|Deg|Mps2)$/.exec(key);
  const base = m ? m[1] : key;
  const unit = m ? { Kn: 'kN', Kg: 'kg', Deg: '°', Mps2: 'm/s²' }[m[2] as 'Kn'] : undefined;
  const name = base.replace(/([a-z])([A-Z0-9])/g, '$1 $2').replace(/(\d)([a-z])/gi, '$1 $2').toLowerCase();
  return { name, unit };
}

export function WorkingTable({ check, fmt }: { check: Pick<LoadCheck, 'working'>; fmt: StudioFormat }) {
  return (
    <details className="rounded-lg border border-line">
      <summary className="flex min-h-11 cursor-pointer items-center px-3 text-sm font-medium">Show the working, step by step</summary>
      <div className="overflow-x-auto border-t border-line">
        <table className="w-full text-left text-sm">
          <caption className="sr-only">Working of the load check: each step, its inputs and its result</caption>
          <thead className="bg-pine-50 text-xs uppercase tracking-wide text-muted">
            <tr>
              <th scope="col" className="px-3 py-2">#</th>
              <th scope="col" className="px-3 py-2">Step</th>
              <th scope="col" className="px-3 py-2">Inputs</th>
              <th scope="col" className="px-3 py-2">Result</th>
            </tr>
          </thead>
          <tbody>
            {check.working.map((w, i) => (
              <tr key={i} className="border-t border-line align-top">
                <td className="px-3 py-2 text-muted">{i + 1}</td>
                <td className="px-3 py-2">{w.label}</td>
                <td className="px-3 py-2">
                  <ul className="space-y-0.5">
                    {Object.entries(w.inputs).map(([k, v]) => {
                      const { name, unit } = inputName(k);
                      return <li key={k}><span className="text-muted">{name}:</span> {figure(v, workingFigureToward(w.step, k), fmt, unit, 6)}</li>;
                    })}
                  </ul>
                </td>
                <td className="whitespace-nowrap px-3 py-2 font-medium">
                  {figure(w.output, workingFigureToward(w.step, null), fmt, w.unit)}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </details>
  );
}
