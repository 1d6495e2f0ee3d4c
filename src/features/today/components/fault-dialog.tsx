import { lazy, Suspense, useCallback, useEffect, useRef, useState } from 'react';
import { X } from 'lucide-react';
import { Loading } from '../../../components/ui/states';
import { ConfirmDialog } from '../../../components/ui/confirm';

// The form (and its photo handling) loads on first use, so the board itself stays small on a phone.
const ReportFaultForm = lazy(() => import('../../faults/components/report-fault-form').then((m) => ({ default: m.ReportFaultForm })));

/**
 * The fault form over the board, full screen on a phone; Escape or the close button returns to
 * the point. While open it is a history entry of its own, so the phone's Back closes the form
 * rather than leaving Today; with a description or photo in it, every way out asks first.
 */
export function FaultDialog({ point, onClose }: { point: { pointId: number; label: string } | null; onClose: () => void }) {
  const ref = useRef<HTMLDialogElement>(null);
  const dirty = useRef(false);
  const pushed = useRef(false);
  const [asking, setAsking] = useState(false);
  const onDirty = useCallback((d: boolean) => { dirty.current = d; }, []);
  // The page passes a new function each render; the history listener must not be re-made for it.
  const closeRef = useRef(onClose);
  closeRef.current = onClose;

  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (point && !d.open) d.showModal();
    if (!point && d.open) d.close();
  }, [point]);

  // Open: one history entry; Back pops it (asking first if something was typed).
  useEffect(() => {
    if (!point) return;
    window.history.pushState({ ...(window.history.state ?? {}), faultForm: true }, '');
    pushed.current = true;
    const onPop = () => {
      if (!pushed.current) return;
      pushed.current = false;
      if (dirty.current) {
        window.history.pushState({ ...(window.history.state ?? {}), faultForm: true }, '');
        pushed.current = true;
        setAsking(true);
      } else closeRef.current();
    };
    window.addEventListener('popstate', onPop);
    return () => window.removeEventListener('popstate', onPop);
  }, [point]);

  /** Closes for good: our history entry goes too, so Back afterwards leaves nothing behind. */
  const close = () => {
    setAsking(false);
    dirty.current = false;
    if (pushed.current) {
      pushed.current = false;
      window.history.back();
    }
    onClose();
  };
  const requestClose = () => (dirty.current ? setAsking(true) : close());

  return (
    <dialog
      ref={ref}
      onCancel={(e) => { e.preventDefault(); requestClose(); }}
      aria-labelledby="fault-dialog-title"
      className="m-0 h-dvh max-h-none w-full max-w-none overflow-y-auto bg-white p-0 backdrop:bg-ink/40 sm:m-auto sm:h-auto sm:max-h-[90dvh] sm:max-w-lg sm:rounded-2xl"
    >
      {point ? (
        <div className="space-y-4 p-4 sm:p-6">
          <div className="flex items-center justify-between gap-2">
            <h2 id="fault-dialog-title" className="text-xl font-semibold">Report a fault on {point.label}</h2>
            <button type="button" onClick={requestClose} className="flex size-12 shrink-0 items-center justify-center rounded-lg hover:bg-pine-50" aria-label="Close without reporting">
              <X aria-hidden />
            </button>
          </div>
          <Suspense fallback={<Loading label="Opening the fault form…" />}>
            <ReportFaultForm key={point.pointId} pointId={point.pointId} onDone={close} onCancel={requestClose} onDirty={onDirty} />
          </Suspense>
        </div>
      ) : null}
      <ConfirmDialog
        open={asking}
        title="Discard this fault report?"
        confirmLabel="Discard it"
        cancelLabel="Keep writing"
        onCancel={() => setAsking(false)}
        onConfirm={close}
      >
        Nothing has been reported yet. Leaving now throws away the description and any photo.
      </ConfirmDialog>
    </dialog>
  );
}
