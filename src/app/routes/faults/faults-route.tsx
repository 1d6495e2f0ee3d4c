import { Route, Routes } from 'react-router-dom';
import { FaultsPage } from '../../../features/faults/faults-page';
import { ReportFaultPage } from '../../../features/faults/report-fault-page';

// `/faults/new?pointId=` needs the router entry to read `${paths.faults}/*`; until then `/faults` alone reaches here.
export default function FaultsRoute() {
  return (
    <Routes>
      <Route index element={<FaultsPage />} />
      <Route path="new" element={<ReportFaultPage />} />
      <Route path="*" element={<FaultsPage />} />
    </Routes>
  );
}
