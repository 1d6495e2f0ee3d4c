import { MailboxPage } from '../../../features/mail/mailbox-page';
import { RoleGate } from '../../role-gate';

export default function MailboxRoute() {
  return (
    <RoleGate roles={['owner']}>
      <MailboxPage />
    </RoleGate>
  );
}
