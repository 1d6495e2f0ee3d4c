import { ComingLater, PageHeader } from '../../../components/ui/states';

export default function TodayRoute() {
  return (
    <>
      <PageHeader title="Today">Your classes today and the status of each point.</PageHeader>
      <ComingLater what="The Today board">It arrives with inspections and faults: each booked point’s status in large type, the pre-use check and fault reports.</ComingLater>
    </>
  );
}
