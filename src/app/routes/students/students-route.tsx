import { Route, Routes, useParams } from 'react-router-dom';
import { StudentsPage } from '../../../features/students/students-page';
import { StudentPage } from '../../../features/students/student-page';
import { RoleGate } from '../../role-gate';
import { useSignedIn } from '../../use-me';

/** `/students/*`: the desk's list and one student's page. Instructors read; reception and the owner edit. */
export default function StudentsRoute() {
  const me = useSignedIn();
  return (
    <RoleGate roles={['owner', 'reception', 'instructor']}>
      <Routes>
        <Route index element={<StudentsPage me={me} />} />
        <Route path=":id" element={<WithId />} />
        <Route path="*" element={<NotFound />} />
      </Routes>
    </RoleGate>
  );
}

function WithId() {
  const me = useSignedIn();
  const n = Number(useParams().id);
  if (!Number.isInteger(n) || n <= 0) return <NotFound />;
  return <StudentPage key={n} id={n} me={me} />;
}

function NotFound() {
  return <p className="rounded-xl border border-line bg-white p-6">There is no student page at this address. Go back to Students from the menu.</p>;
}
