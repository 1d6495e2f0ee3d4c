import { SMTPServer } from 'smtp-server';
import { simpleParser, type AddressObject } from 'mailparser';
import type { AddressInfo } from 'node:net';

export interface CaughtMessage {
  to: string[];
  subject: string;
  text: string;
  html: string;
  receivedAt: string;
}

export interface FakeSmtp {
  url: string;
  port: number;
  messages(): CaughtMessage[];
  close(): Promise<void>;
}

const KEEP = 500;

function addresses(a: AddressObject | AddressObject[] | undefined): string[] {
  return ([] as AddressObject[]).concat(a ?? []).flatMap((o) => o.value.map((v) => v.address ?? '')).filter(Boolean);
}

/** The built-in mail catcher: a real SMTP server on loopback that keeps what it receives, newest first. */
export async function startFakeSmtp(port = 0): Promise<FakeSmtp> {
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
            to: addresses(mail.to),
            subject: mail.subject ?? '',
            text: mail.text ?? '',
            html: typeof mail.html === 'string' ? mail.html : '',
            receivedAt: new Date().toISOString(),
          });
          caught.length = Math.min(caught.length, KEEP);
          callback();
        })
        .catch((err: Error) => callback(err));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', () => resolve());
  });
  const actual = (server.server.address() as AddressInfo).port;
  return {
    url: `smtp://127.0.0.1:${actual}`,
    port: actual,
    messages: () => caught.slice(),
    close: () => new Promise((resolve) => server.close(() => resolve())),
  };
}
