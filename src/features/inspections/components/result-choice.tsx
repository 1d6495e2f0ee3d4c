import { CircleCheck, Eye, OctagonX } from 'lucide-react';
import { inspectionResults, type InspectionResult } from '../../../../shared/schemas/vocabulary';
import { resultText } from '../labels';

const look: Record<InspectionResult, { Icon: typeof CircleCheck; on: string }> = {
  pass: { Icon: CircleCheck, on: 'bg-ok-700 text-white' },
  attention: { Icon: Eye, on: 'bg-warn-700 text-white' },
  fail: { Icon: OctagonX, on: 'bg-stop-700 text-white' },
};

/** Pass / attention / fail for one row: radio inputs underneath, so arrow keys move between them. */
export function ResultChoice({ name, legend, value, onChange, invalid, describedBy }: { name: string; legend: string; value: InspectionResult | undefined; onChange: (r: InspectionResult) => void; invalid?: boolean; describedBy?: string }) {
  return (
    <fieldset aria-describedby={describedBy}>
      <legend className="sr-only">{legend}</legend>
      <div className={`inline-flex flex-wrap rounded-lg border bg-white p-0.5 ${invalid ? 'border-stop-700' : 'border-line'}`}>
        {inspectionResults.map((r) => {
          const { Icon, on } = look[r];
          return (
            <label key={r} title={resultText[r].explain} className={`flex min-h-11 cursor-pointer items-center gap-1.5 rounded-md px-3 text-sm font-medium has-[:focus-visible]:outline has-[:focus-visible]:outline-3 has-[:focus-visible]:outline-brass-500 ${value === r ? on : 'text-ink hover:bg-pine-50'}`}>
              <input type="radio" className="sr-only" name={name} value={r} checked={value === r} onChange={() => onChange(r)} aria-invalid={invalid || undefined} />
              <Icon className="size-4" aria-hidden />
              {resultText[r].label}
            </label>
          );
        })}
      </div>
    </fieldset>
  );
}
