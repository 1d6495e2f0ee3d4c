import type { ReactNode } from 'react';
import { Route, Routes, useParams } from 'react-router-dom';
import { GearListPage } from '../../../features/rig/gear-list-page';
import { GearPage } from '../../../features/rig/gear-page';
import { LabelsPage } from '../../../features/rig/labels-page';
import { PointPage } from '../../../features/rig/point-page';
import { RigPage } from '../../../features/rig/rig-page';
import { PointHistory } from '../../../features/inspections/components/point-history';
import { useStudioTimeZone } from '../../../features/today/api';
import { formatInZone } from '../../../components/ui/zoned-time';
import { ClassRecords } from '../../../features/schedule/components/class-records';

/** `/rig/*`: the register, a point, the gear list, a gear item, and the label sheet. */
export default function RigRoute() {
  return (
    <Routes>
      <Route index element={<RigPage />} />
      <Route path="points/:id" element={<WithId render={(id) => <WithHistory history={<><PointHistory pointId={id} /><PointClassRecords pointId={id} /></>}><PointPage key={id} id={id} /></WithHistory>} />} />
      <Route path="gear" element={<GearListPage />} />
      <Route path="gear/:id" element={<WithId render={(id) => <WithHistory history={<PointHistory gearId={id} />}><GearPage key={id} id={id} /></WithHistory>} />} />
      <Route path="labels" element={<LabelsPage />} />
      <Route path="*" element={<NotFound />} />
    </Routes>
  );
}

function WithId({ render }: { render: (id: number) => ReactNode }) {
  const { id } = useParams();
  const n = Number(id);
  if (!Number.isInteger(n) || n <= 0) return <NotFound />;
  return <>{render(n)}</>;
}

/** The rig pages with the inspection and fault history beneath, composed here so features stay apart. */
function WithHistory({ children, history }: { children: ReactNode; history: ReactNode }) {
  const zone = useStudioTimeZone();
  return (
    <>
      {/* On paper, say when it was printed: the page shows the record as it stood then. */}
      {zone.data ? <p className="mb-2 hidden text-sm print:block">Printed {formatInZone(new Date().toISOString(), zone.data)} ({zone.data.replace(/_/g, ' ')}). Each inspection shows the point’s status when it was signed.</p> : null}
      {children}
      <section aria-labelledby="history-heading" className="mt-6 max-w-5xl rounded-xl border border-line bg-white p-5">
        <h2 id="history-heading" className="mb-3 text-lg font-semibold">History</h2>
        {history}
      </section>
    </>
  );
}

/** The point's classes as each stood at its start, in the studio's zone. */
function PointClassRecords({ pointId }: { pointId: number }) {
  const zone = useStudioTimeZone();
  return zone.data ? <ClassRecords pointId={pointId} timeZone={zone.data} /> : null;
}

function NotFound() {
  return <p className="rounded-xl border border-line bg-white p-6">There is no rig page at this address. Go back to the Rig page from the menu.</p>;
}
