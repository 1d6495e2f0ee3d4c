import type { ApiRouter } from '../../http/route';
import { notFound } from '../../http/errors';
import type { Mailbox } from '../../mail/fake-smtp';

export function mailboxRoutes(api: ApiRouter, fake: Mailbox | null) {
  api.get('/dev/mailbox', {
    access: ['owner'],
    handler: () => {
      // Only while the built-in catcher runs; with a real SMTP_URL there is no mailbox.
      if (!fake) throw notFound('The mailbox (a real SMTP server is configured)');
      return fake.messages();
    },
  });
}
