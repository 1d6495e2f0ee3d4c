import { SettingsPage } from '../../../features/settings/settings-page';
import { RoleGate } from '../../role-gate';

export default function SettingsRoute() {
  return (
    <RoleGate roles={['owner']}>
      <SettingsPage />
    </RoleGate>
  );
}
