import { useSignedIn } from '../../use-me';
import { SchedulePage } from '../../../features/schedule/schedule-page';
import { SessionStudents } from '../../../features/students/components/session-students';

// Loaded lazily by the router: FullCalendar (in the schedule feature) stays out of the first bundle.
// The class drawer shows the class's students from the students feature, composed here so features stay apart.
export default function ScheduleRoute() {
  const me = useSignedIn();
  return <SchedulePage me={me} sessionExtra={(session, canEdit) => <SessionStudents session={session} canEdit={canEdit} />} />;
}
