import { useId } from 'react';

/** A small set of exclusive choices shown as a row of buttons (radio inputs underneath, so arrow keys work). */
export function ChoiceGroup<T extends string>({
  legend,
  value,
  options,
  onChange,
  name,
}: {
  legend: string;
  value: T;
  options: readonly { value: T; label: string }[];
  onChange: (value: T) => void;
  name?: string;
}) {
  const auto = useId();
  const group = name ?? auto;
  return (
    <fieldset className="space-y-1">
      <legend className="text-sm font-medium text-ink">{legend}</legend>
      <div className="inline-flex flex-wrap rounded-lg border border-line bg-white p-0.5">
        {options.map((o) => (
          <label
            key={o.value}
            className={`flex min-h-11 min-w-11 cursor-pointer items-center justify-center rounded-md px-3 text-sm font-medium has-[:focus-visible]:outline has-[:focus-visible]:outline-3 has-[:focus-visible]:outline-brass-500 ${
              value === o.value ? 'bg-pine-700 text-white' : 'text-ink hover:bg-pine-50'
            }`}
          >
            <input type="radio" className="sr-only" name={group} value={o.value} checked={value === o.value} onChange={() => onChange(o.value)} />
            {o.label}
          </label>
        ))}
      </div>
    </fieldset>
  );
}
