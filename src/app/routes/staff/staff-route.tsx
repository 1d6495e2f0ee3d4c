import { StaffPage } from '../../../features/staff/staff-page';
import { RoleGate } from '../../role-gate';
import { useSignedIn } from '../../use-me';

export default function StaffRoute() {
  const me = useSignedIn();
  return (
    <RoleGate roles={['owner', 'reception']}>
      <StaffPage me={me} />
    </RoleGate>
  );
}
