import nodemailer from 'nodemailer';
import { isLoopbackHost } from '../config';

export interface OutgoingMail {
  /** `<…@host>`, the same at every attempt to send one outbox row (see outboxMessageId). */
  messageId: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
  /** The outbox kind, sent as an X-Loftwise-Kind header so the Mailbox can filter what it caught. */
  kind?: string;
}

export interface Mailer {
  send(mail: OutgoingMail): Promise<void>;
  close(): void;
}

/**
 * The same nodemailer SMTP transport for the built-in catcher and a real server at SMTP_URL.
 * With credentials, a server off this machine gets them only over TLS: `smtps://`, or STARTTLS
 * required (nodemailer gives up before AUTH when the server does not offer it), certificates
 * verified (nodemailer's default). See DEVELOPERS.md, "Mail".
 */
export function smtpMailer(smtpUrl: string, from: string): Mailer {
  const url = new URL(smtpUrl);
  const secure = url.protocol === 'smtps:';
  const loopback = isLoopbackHost(url.hostname);
  const credentials = Boolean(url.username);
  const transport = nodemailer.createTransport({
    host: url.hostname.replace(/^\[|\]$/g, ''),
    port: Number(url.port || (secure ? 465 : 587)),
    secure,
    auth: credentials ? { user: decodeURIComponent(url.username), pass: decodeURIComponent(url.password) } : undefined,
    requireTLS: !secure && credentials && !loopback,
    // Loopback needs no TLS (the built-in catcher offers none); elsewhere STARTTLS is used when offered.
    ignoreTLS: !secure && loopback,
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 20_000,
  });
  return {
    async send(mail) {
      await transport.sendMail({ from, messageId: mail.messageId, to: mail.to, subject: mail.subject, text: mail.text, html: mail.html, ...(mail.kind ? { headers: { 'X-Loftwise-Kind': mail.kind } } : {}) });
    },
    close: () => transport.close(),
  };
}
