import { useState } from 'react';
import type { Session } from '../../../../shared/schemas/sessions';
import { Button } from '../../../components/ui/button';
import { ConfirmDialog } from '../../../components/ui/confirm';
import { errorMessage } from '../../../lib/api-client';
import { usePlaceMutations, type Student } from '../api';
import { StudentPicker } from './student-picker';
import type { FreePoint } from './session-students';

/**
 * Book a student into the class: find them, optionally choose the point (else the server picks a
 * free place), book. A full class puts them on the waitlist, and the button says so first.
 */
export function BookStudentForm({ session, free, onClose, onBooked }: {
  session: Session;
  free: FreePoint[];
  onClose: () => void;
  onBooked: (text: string, lines: string[], tone: 'ok' | 'warn') => void;
}) {
  const [student, setStudent] = useState<Student | null>(null);
  const [pointId, setPointId] = useState<number | ''>('');
  const [error, setError] = useState<string | null>(null);
  const [askDiscard, setAskDiscard] = useState(false);
  const { book } = usePlaceMutations();
  const full = free.length === 0;
  const labelOf = (id: number | null) => session.points.find((p) => p.pointId === id)?.label;
  const submit = (e: React.FormEvent) => {
    e.preventDefault();
    if (!student) return setError('Find and pick a student first.');
    setError(null);
    book.mutate({ sessionId: session.id, studentId: student.id, ...(pointId === '' ? {} : { pointId }) }, {
      onSuccess: (r) => {
        const lines = r.warnings.map((w) => w.message);
        if (r.status === 'waitlisted') onBooked(`${student.name} is number ${r.position ?? '?'} on the waitlist for ${session.className}.`, lines, 'warn');
        else onBooked(`Booked ${student.name} on point ${labelOf(r.pointId) ?? r.pointId}.`, lines, lines.length ? 'warn' : 'ok');
      },
      onError: (err) => setError(errorMessage(err)),
    });
  };
  return (
    <form onSubmit={submit} aria-label="Book a student" className="space-y-3 rounded-xl border border-line bg-white p-4">
      <h4 className="font-semibold">Book a student</h4>
      {student ? (
        <div className="flex flex-wrap items-center justify-between gap-2 rounded-lg bg-pine-50 px-3 py-2">
          <span><span className="font-medium">{student.name}</span> <span className="text-sm text-muted">{student.email}</span>{student.waiver.ok ? null : <span className="ml-1 text-sm font-medium text-warn-700">· no valid waiver</span>}</span>
          <Button type="button" variant="ghost" onClick={() => { setStudent(null); setPointId(''); }}>Change</Button>
        </div>
      ) : (
        <StudentPicker label="Student" onPick={(s) => { setError(null); setStudent(s); }} autoFocus />
      )}
      {student && !full ? (
        <div className="space-y-1">
          <label htmlFor={`book-point-${session.id}`} className="block text-sm font-medium">Point</label>
          <select id={`book-point-${session.id}`} value={pointId} onChange={(e) => setPointId(e.target.value === '' ? '' : Number(e.target.value))} className="block min-h-11 w-full rounded-lg border border-line bg-white px-3">
            <option value="">Any free place</option>
            {free.map((f) => <option key={f.pointId} value={f.pointId}>Point {f.label} ({f.free} free)</option>)}
          </select>
        </div>
      ) : null}
      {student && full ? <p className="text-sm text-warn-700">The class is full: {student.name} goes on the waitlist and gets the first place that frees up.</p> : null}
      {error ? <p role="alert" className="text-sm text-stop-700">{error}</p> : null}
      <div className="flex gap-2">
        <Button type="submit" busy={book.isPending} disabled={!student}>{full ? 'Add to the waitlist' : 'Book'}</Button>
        <Button type="button" variant="secondary" onClick={() => (student ? setAskDiscard(true) : onClose())}>Cancel</Button>
      </div>
      <ConfirmDialog
        open={askDiscard}
        title="Stop booking this student?"
        confirmLabel="Stop"
        cancelLabel="Keep booking"
        onCancel={() => setAskDiscard(false)}
        onConfirm={() => { setAskDiscard(false); onClose(); }}
      >
        {student ? `${student.name} is not booked yet.` : null}
      </ConfirmDialog>
    </form>
  );
}
