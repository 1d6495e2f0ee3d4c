import { AccountPage } from '../../../features/account/account-page';
import { CalendarFeedCard } from '../../../features/student-portal/calendar-feed';
import { roleLabel } from '../../navigation';
import { useSignedIn } from '../../use-me';

export default function AccountRoute() {
  const me = useSignedIn();
  return (
    <div className="max-w-2xl space-y-6">
      <AccountPage me={me} roleName={roleLabel[me.role]} />
      {me.role === 'instructor' ? <CalendarFeedCard what="your classes, with their room, points and changeovers" /> : null}
    </div>
  );
}
