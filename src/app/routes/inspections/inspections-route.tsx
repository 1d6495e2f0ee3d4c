import { ComingLater, PageHeader } from '../../../components/ui/states';

export default function InspectionsRoute() {
  return (
    <>
      <PageHeader title="Inspections">Periodic and after-incident inspections, clearances and the inspection log.</PageHeader>
      <ComingLater what="Inspections" />
    </>
  );
}
