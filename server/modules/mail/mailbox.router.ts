import type { ApiRouter } from '../../http/route';
import { notFound } from '../../http/errors';
import type { Mailbox } from '../../mail/fake-smtp';
import { mailboxQuery } from '../../../shared/schemas/outbox';

export function mailboxRoutes(api: ApiRouter, fake: Mailbox | null) {
  api.get('/dev/mailbox', {
    access: ['owner'],
    query: mailboxQuery,
    handler: async ({ query }) => {
      // Only while the built-in catcher runs; with a real SMTP_URL there is no mailbox.
      if (!fake) throw notFound('The mailbox (a real SMTP server is configured)');
      return (await fake.messages()).filter((m) => (!query.kind || m.kind === query.kind) && (!query.to || m.to.some((t) => t.toLowerCase() === query.to)));
    },
  });
}
