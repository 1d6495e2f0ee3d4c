import { ComingLater, PageHeader } from '../../../components/ui/states';

export default function RigRoute() {
  return (
    <>
      <PageHeader title="Rig">Rooms, rigging points, gear and load paths.</PageHeader>
      <ComingLater what="The rig register">It arrives with the load check.</ComingLater>
    </>
  );
}
