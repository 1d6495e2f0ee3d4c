import { useEffect, useId, useRef, type ReactNode } from 'react';
import { X } from 'lucide-react';

/**
 * A modal panel: a drawer from the right (`side="right"`) or a centred dialog. Built on the
 * native <dialog>, so focus stays inside, Escape closes it and the page behind is inert.
 */
export function Sheet({
  open,
  title,
  description,
  onClose,
  side = 'center',
  wide = false,
  children,
  footer,
  closeOnBackdrop = true,
}: {
  open: boolean;
  title: ReactNode;
  description?: ReactNode;
  onClose: () => void;
  side?: 'center' | 'right';
  wide?: boolean;
  children: ReactNode;
  footer?: ReactNode;
  /** Off for forms, so a stray click beside the panel never throws away what was typed. */
  closeOnBackdrop?: boolean;
}) {
  const ref = useRef<HTMLDialogElement>(null);
  const downOnBackdrop = useRef(false);
  const titleId = useId();
  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (open && !d.open) d.showModal();
    if (!open && d.open) d.close();
  }, [open]);
  const frame =
    side === 'right'
      ? 'ml-auto mr-0 my-0 h-dvh max-h-dvh w-full max-w-xl rounded-none'
      : `m-auto max-h-[92dvh] w-full rounded-2xl ${wide ? 'max-w-4xl' : 'max-w-lg'}`;
  return (
    <dialog
      ref={ref}
      aria-labelledby={titleId}
      onCancel={(e) => {
        e.preventDefault();
        onClose();
      }}
      onMouseDown={(e) => {
        downOnBackdrop.current = e.target === e.currentTarget;
      }}
      onClick={(e) => {
        // A click that starts and ends on the backdrop (the dialog element itself) closes it.
        if (closeOnBackdrop && downOnBackdrop.current && e.target === e.currentTarget) onClose();
      }}
      className={`${frame} overflow-hidden bg-canvas p-0 text-ink backdrop:bg-ink/40`}
    >
      {open ? (
        <div className="flex max-h-[inherit] flex-col" style={side === 'right' ? { height: '100dvh' } : { maxHeight: '92dvh' }}>
          <header className="flex items-start justify-between gap-4 border-b border-line bg-white px-6 py-4">
            <div>
              <h2 id={titleId} className="text-lg font-semibold">{title}</h2>
              {description ? <div className="mt-0.5 text-sm text-muted">{description}</div> : null}
            </div>
            <button type="button" onClick={onClose} className="-mr-2 flex size-11 shrink-0 items-center justify-center rounded-lg text-muted hover:bg-pine-50" aria-label="Close">
              <X className="size-5" aria-hidden />
            </button>
          </header>
          <div className="min-h-0 flex-1 overflow-y-auto px-6 py-5">{children}</div>
          {footer ? <footer className="flex flex-wrap justify-end gap-2 border-t border-line bg-white px-6 py-3">{footer}</footer> : null}
        </div>
      ) : null}
    </dialog>
  );
}
