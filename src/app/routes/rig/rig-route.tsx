import type { ReactNode } from 'react';
import { Route, Routes, useParams } from 'react-router-dom';
import { GearListPage } from '../../../features/rig/gear-list-page';
import { GearPage } from '../../../features/rig/gear-page';
import { LabelsPage } from '../../../features/rig/labels-page';
import { PointPage } from '../../../features/rig/point-page';
import { RigPage } from '../../../features/rig/rig-page';

/** `/rig/*`: the register, a point, the gear list, a gear item, and the label sheet. */
export default function RigRoute() {
  return (
    <Routes>
      <Route index element={<RigPage />} />
      <Route path="points/:id" element={<WithId render={(id) => <PointPage key={id} id={id} />} />} />
      <Route path="gear" element={<GearListPage />} />
      <Route path="gear/:id" element={<WithId render={(id) => <GearPage key={id} id={id} />} />} />
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

function NotFound() {
  return <p className="rounded-xl border border-line bg-white p-6">There is no rig page at this address. Go back to the Rig page from the menu.</p>;
}
