import { SMTPServer } from 'smtp-server';
import { simpleParser, type AddressObject } from 'mailparser';
import type { AddressInfo } from 'node:net';

export interface CaughtMessage {
  /** The Message-ID header as sent, angle brackets included ('' when there was none). */
  messageId: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
  receivedAt: string;
  /** The X-Loftwise-Kind header (the outbox kind), null for mail from elsewhere. */
  kind: string | null;
}

/** What the Mailbox page reads: the catcher itself, or (several processes) the primary's through IPC. */
export interface Mailbox {
  messages(): CaughtMessage[] | Promise<CaughtMessage[]>;
}

export interface FakeSmtp {
  url: string;
  port: number;
  messages(): CaughtMessage[];
  close(): Promise<void>;
}

/** Messages the Mailbox page keeps by default; older ones are forgotten. */
const KEEP = 500;

function addresses(a: AddressObject | AddressObject[] | undefined): string[] {
  return ([] as AddressObject[]).concat(a ?? []).flatMap((o) => o.value.map((v) => v.address ?? '')).filter(Boolean);
}

/**
 * The built-in mail catcher: a real SMTP server on loopback that keeps what it receives, newest
 * first (the last `keep`). A message is kept only once received in full, before the sender is told
 * it was accepted; one cut off mid-transfer is not.
 */
export async function startFakeSmtp(port = 0, options: { keep?: number } = {}): Promise<FakeSmtp> {
  const keep = options.keep ?? KEEP;
  const caught: CaughtMessage[] = [];
  const server = new SMTPServer({
    // Mail clients may send empty credentials; this server accepts any and offers no TLS.
    disabledCommands: ['STARTTLS', 'AUTH'],
    authOptional: true,
    logger: false,
    size: 5 * 1024 * 1024,
    onData(stream, _session, callback) {
      simpleParser(stream)
        .then((mail) => {
          caught.unshift({
            messageId: mail.messageId ?? '',
            to: addresses(mail.to),
            subject: mail.subject ?? '',
            text: mail.text ?? '',
            html: typeof mail.html === 'string' ? mail.html : '',
            receivedAt: new Date().toISOString(),
            kind: typeof mail.headers.get('x-loftwise-kind') === 'string' ? (mail.headers.get('x-loftwise-kind') as string) : null,
          });
          caught.length = Math.min(caught.length, keep);
          callback();
        })
        .catch((err: Error) => callback(err));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', () => {
      server.off('error', reject);
      // Once listening, errors are one client's connection (a sender that hung up or died mid-message):
      // that connection closes, and an unheard 'error' event must not take the whole process down.
      server.on('error', () => undefined);
      resolve();
    });
  });
  const actual = (server.server.address() as AddressInfo).port;
  return {
    url: `smtp://127.0.0.1:${actual}`,
    port: actual,
    messages: () => caught.slice(),
    close: () => new Promise((resolve) => server.close(() => resolve())),
  };
}
