import { AuditPage } from '../../../features/audit/audit-page';
import { RoleGate } from '../../role-gate';

export default function AuditRoute() {
  return (
    <RoleGate roles={['owner']}>
      <AuditPage />
    </RoleGate>
  );
}
