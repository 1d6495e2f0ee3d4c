import { ClassTypesPage } from '../../../features/schedule/class-types-page';
import { RoleGate } from '../../role-gate';

export default function ClassTypesRoute() {
  return (
    <RoleGate roles={['owner', 'reception']}>
      <ClassTypesPage />
    </RoleGate>
  );
}
