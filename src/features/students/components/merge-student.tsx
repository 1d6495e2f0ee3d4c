import { useState } from 'react';
import { useNavigate } from 'react-router-dom';
import { toast } from 'sonner';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/states';
import { ConfirmDialog } from '../../../components/ui/confirm';
import { errorMessage } from '../../../lib/api-client';
import { paths } from '../../../lib/paths';
import { useStudentMutations, type Student } from '../api';
import { StudentPicker } from './student-picker';

const who = (s: Student) => `${s.name} (${s.email})`;

/**
 * The owner merges this student, a duplicate, into the record to keep: its bookings and waivers
 * move across and this record goes. The question names both before anything happens.
 */
export function MergeStudent({ student, onClose }: { student: Student; onClose: () => void }) {
  const [keep, setKeep] = useState<Student | null>(null);
  const [error, setError] = useState<string | null>(null);
  const { merge } = useStudentMutations();
  const navigate = useNavigate();
  return (
    <Card>
      <h2 className="mb-1 font-semibold">Merge {student.name} into another record</h2>
      <p className="mb-3 text-sm text-muted">Use this when the same person was added twice. Pick the record to keep: this one’s bookings and waivers move to it, and this record is removed.</p>
      <StudentPicker label="Record to keep" exclude={student.id} onPick={(s) => { setError(null); setKeep(s); }} autoFocus />
      {error ? <p role="alert" className="mt-2 text-sm text-stop-700">{error}</p> : null}
      <div className="mt-3"><Button variant="secondary" onClick={onClose}>Close</Button></div>
      <ConfirmDialog
        open={keep !== null}
        title={keep ? `Merge ${student.name} into ${keep.name}?` : 'Merge?'}
        confirmLabel="Merge"
        busy={merge.isPending}
        onCancel={() => setKeep(null)}
        onConfirm={() => {
          if (!keep) return;
          merge.mutate({ id: student.id, intoId: keep.id }, {
            onSuccess: () => { toast.success(`${student.name} is merged into ${keep.name}.`); setKeep(null); onClose(); navigate(paths.student(keep.id), { replace: true }); },
            onError: (err) => { setKeep(null); setError(errorMessage(err)); },
          });
        }}
      >
        <p><strong>{who(student)}</strong> goes; <strong>{who(keep ?? student)}</strong> is kept with both records’ bookings and waivers. This cannot be undone.</p>
      </ConfirmDialog>
    </Card>
  );
}
