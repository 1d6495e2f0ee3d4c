import { useSignedIn } from '../../use-me';
import { SchedulePage } from '../../../features/schedule/schedule-page';

// Loaded lazily by the router: FullCalendar (in the schedule feature) stays out of the first bundle.
export default function ScheduleRoute() {
  const me = useSignedIn();
  return <SchedulePage me={me} />;
}
