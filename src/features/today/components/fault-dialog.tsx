import { lazy, Suspense, useEffect, useRef } from 'react';
import { X } from 'lucide-react';
import { Loading } from '../../../components/ui/states';

// The form (and its photo handling) loads on first use, so the board itself stays small on a phone.
const ReportFaultForm = lazy(() => import('../../faults/components/report-fault-form').then((m) => ({ default: m.ReportFaultForm })));

/** The fault form over the board, full screen on a phone; Escape or the close button returns to the point. */
export function FaultDialog({ point, onClose }: { point: { pointId: number; label: string } | null; onClose: () => void }) {
  const ref = useRef<HTMLDialogElement>(null);
  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (point && !d.open) d.showModal();
    if (!point && d.open) d.close();
  }, [point]);
  return (
    <dialog
      ref={ref}
      onCancel={(e) => { e.preventDefault(); onClose(); }}
      aria-labelledby="fault-dialog-title"
      className="m-0 h-dvh max-h-none w-full max-w-none overflow-y-auto bg-white p-0 backdrop:bg-ink/40 sm:m-auto sm:h-auto sm:max-h-[90dvh] sm:max-w-lg sm:rounded-2xl"
    >
      {point ? (
        <div className="space-y-4 p-4 sm:p-6">
          <div className="flex items-center justify-between gap-2">
            <h2 id="fault-dialog-title" className="text-xl font-semibold">Report a fault on {point.label}</h2>
            <button type="button" onClick={onClose} className="flex size-12 shrink-0 items-center justify-center rounded-lg hover:bg-pine-50" aria-label="Close without reporting">
              <X aria-hidden />
            </button>
          </div>
          <Suspense fallback={<Loading label="Opening the fault form…" />}>
            <ReportFaultForm key={point.pointId} pointId={point.pointId} onDone={onClose} onCancel={onClose} />
          </Suspense>
        </div>
      ) : null}
    </dialog>
  );
}
