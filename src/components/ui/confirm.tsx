import { useEffect, useId, useRef, type ReactNode } from 'react';
import { Button } from './button';

/** A modal question before anything destructive. Escape or Cancel closes it. */
export function ConfirmDialog({
  open,
  title,
  children,
  confirmLabel,
  cancelLabel = 'Cancel',
  danger = true,
  wide = false,
  busy,
  onConfirm,
  onCancel,
}: {
  open: boolean;
  title: string;
  children?: ReactNode;
  confirmLabel: string;
  cancelLabel?: string;
  danger?: boolean;
  /** Room for a list (a policy change's effects). */
  wide?: boolean;
  busy?: boolean;
  onConfirm: () => void;
  onCancel: () => void;
}) {
  const ref = useRef<HTMLDialogElement>(null);
  // One id per dialog: a page with a confirm per row (Staff) must not label them all with the first title.
  const titleId = useId();
  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (open && !d.open) d.showModal();
    if (!open && d.open) d.close();
  }, [open]);
  return (
    <dialog ref={ref} onCancel={(e) => { e.preventDefault(); onCancel(); }} className={`m-auto w-full ${wide ? 'max-w-2xl' : 'max-w-md'} rounded-2xl p-0 backdrop:bg-ink/40`} aria-labelledby={titleId}>
      <div className="space-y-4 p-6">
        <h2 id={titleId} className="text-lg font-semibold">{title}</h2>
        {children ? <div className="text-sm text-muted">{children}</div> : null}
        <div className="flex justify-end gap-2">
          <Button variant="secondary" onClick={onCancel}>{cancelLabel}</Button>
          <Button variant={danger ? 'danger' : 'primary'} busy={busy} onClick={onConfirm}>{confirmLabel}</Button>
        </div>
      </div>
    </dialog>
  );
}
