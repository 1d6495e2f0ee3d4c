import { InspectionsPage } from '../../../features/inspections/inspections-page';
import { RoleGate } from '../../role-gate';

export default function InspectionsRoute() {
  return (
    <RoleGate roles={['owner', 'rigger']}>
      <InspectionsPage />
    </RoleGate>
  );
}
