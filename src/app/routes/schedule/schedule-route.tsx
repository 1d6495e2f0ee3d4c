import { ComingLater, PageHeader } from '../../../components/ui/states';

export default function ScheduleRoute() {
  return (
    <>
      <PageHeader title="Schedule">Classes booked onto specific rigging points.</PageHeader>
      <ComingLater what="The schedule">It arrives with booking: the calendar refuses any point that is blocked for the class.</ComingLater>
    </>
  );
}
