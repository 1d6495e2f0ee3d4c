import { forwardRef, useId, type InputHTMLAttributes, type ReactNode, type SelectHTMLAttributes, type TextareaHTMLAttributes } from 'react';

interface FieldShell {
  label: string;
  error?: string;
  hint?: ReactNode;
}

const control = 'block w-full min-h-11 rounded-lg border bg-white px-3 py-2 text-ink placeholder:text-muted/70 aria-[invalid=true]:border-stop-700';

function Shell({ id, label, error, hint, children }: FieldShell & { id: string; children: ReactNode }) {
  return (
    <div className="space-y-1">
      <label htmlFor={id} className="block text-sm font-medium text-ink">
        {label}
      </label>
      {children}
      {hint && !error ? <p id={`${id}-hint`} className="text-xs text-muted">{hint}</p> : null}
      {error ? (
        <p id={`${id}-error`} className="text-sm text-stop-700" role="alert">
          {error}
        </p>
      ) : null}
    </div>
  );
}

export const TextField = forwardRef<HTMLInputElement, InputHTMLAttributes<HTMLInputElement> & FieldShell>(function TextField(
  { label, error, hint, id, className = '', ...rest },
  ref,
) {
  const auto = useId();
  const fid = id ?? auto;
  return (
    <Shell id={fid} label={label} error={error} hint={hint}>
      <input
        ref={ref}
        id={fid}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${fid}-error` : hint ? `${fid}-hint` : undefined}
        className={`${control} border-line ${className}`}
        {...rest}
      />
    </Shell>
  );
});

export const SelectField = forwardRef<HTMLSelectElement, SelectHTMLAttributes<HTMLSelectElement> & FieldShell>(function SelectField(
  { label, error, hint, id, className = '', children, ...rest },
  ref,
) {
  const auto = useId();
  const fid = id ?? auto;
  return (
    <Shell id={fid} label={label} error={error} hint={hint}>
      <select
        ref={ref}
        id={fid}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${fid}-error` : hint ? `${fid}-hint` : undefined}
        className={`${control} border-line ${className}`}
        {...rest}
      >
        {children}
      </select>
    </Shell>
  );
});

export const TextAreaField = forwardRef<HTMLTextAreaElement, TextareaHTMLAttributes<HTMLTextAreaElement> & FieldShell>(function TextAreaField(
  { label, error, hint, id, className = '', rows = 3, ...rest },
  ref,
) {
  const auto = useId();
  const fid = id ?? auto;
  return (
    <Shell id={fid} label={label} error={error} hint={hint}>
      <textarea
        ref={ref}
        id={fid}
        rows={rows}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${fid}-error` : hint ? `${fid}-hint` : undefined}
        className={`${control} border-line ${className}`}
        {...rest}
      />
    </Shell>
  );
});

/** A checkbox with its label beside it; the whole row is the touch target. */
export const CheckboxField = forwardRef<HTMLInputElement, Omit<InputHTMLAttributes<HTMLInputElement>, 'type'> & { label: ReactNode; hint?: ReactNode; error?: string }>(
  function CheckboxField({ label, hint, error, id, className = '', ...rest }, ref) {
    const auto = useId();
    const fid = id ?? auto;
    return (
      <div className={className}>
        <label htmlFor={fid} className="flex min-h-11 cursor-pointer items-center gap-3 rounded-lg px-1 text-sm text-ink">
          <input
            ref={ref}
            id={fid}
            type="checkbox"
            aria-invalid={error ? true : undefined}
            aria-describedby={error ? `${fid}-error` : hint ? `${fid}-hint` : undefined}
            className="size-5 shrink-0 accent-pine-700"
            {...rest}
          />
          <span>{label}</span>
        </label>
        {hint && !error ? <p id={`${fid}-hint`} className="pl-9 text-xs text-muted">{hint}</p> : null}
        {error ? <p id={`${fid}-error`} role="alert" className="pl-9 text-sm text-stop-700">{error}</p> : null}
      </div>
    );
  },
);
