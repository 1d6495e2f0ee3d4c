import { SettingsPage } from '../../../features/settings/settings-page';
import { WaiverVersions } from '../../../features/students/components/waiver-versions';
import { useStudioTimeZone } from '../../../features/today/api';
import { RoleGate } from '../../role-gate';

export default function SettingsRoute() {
  return (
    <RoleGate roles={['owner']}>
      <SettingsPage />
      <StudioWaiver />
    </RoleGate>
  );
}

/** The waiver text sits with the studio's settings; it belongs to the students feature, composed here. */
function StudioWaiver() {
  const zone = useStudioTimeZone();
  return zone.data ? <div className="mt-8"><WaiverVersions timeZone={zone.data} /></div> : null;
}
