import nodemailer from 'nodemailer';

export interface OutgoingMail {
  /** `<…@host>`, the same at every attempt to send one outbox row (see outboxMessageId). */
  messageId: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
}

export interface Mailer {
  send(mail: OutgoingMail): Promise<void>;
  close(): void;
}

/** The same nodemailer SMTP transport for the built-in catcher and a real server at SMTP_URL. */
export function smtpMailer(smtpUrl: string, from: string): Mailer {
  const url = new URL(smtpUrl);
  const transport = nodemailer.createTransport({
    host: url.hostname,
    port: Number(url.port || (url.protocol === 'smtps:' ? 465 : 587)),
    secure: url.protocol === 'smtps:',
    auth: url.username ? { user: decodeURIComponent(url.username), pass: decodeURIComponent(url.password) } : undefined,
    ignoreTLS: url.hostname === '127.0.0.1',
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 20_000,
  });
  return {
    async send(mail) {
      await transport.sendMail({ from, messageId: mail.messageId, to: mail.to, subject: mail.subject, text: mail.text, html: mail.html });
    },
    close: () => transport.close(),
  };
}
