import { ComingLater, PageHeader } from '../../../components/ui/states';

export default function FaultsRoute() {
  return (
    <>
      <PageHeader title="Faults">Reported faults on points and gear, open and resolved.</PageHeader>
      <ComingLater what="Fault reports" />
    </>
  );
}
