import { AccountPage } from '../../../features/account/account-page';
import { roleLabel } from '../../navigation';
import { useSignedIn } from '../../use-me';

export default function AccountRoute() {
  const me = useSignedIn();
  return <AccountPage me={me} roleName={roleLabel[me.role]} />;
}
