/** Outgoing mail through nodemailer over SMTP: to the in-process fake by default, or SMTP_URL. */
import nodemailer from 'nodemailer';

export interface MailMessage {
  to: string;
  subject: string;
  text: string;
  html?: string;
}

export interface Mailer {
  send(msg: MailMessage): Promise<void>;
  close(): void;
}

/** CR and LF in a header value would start a new header: fold them to spaces. */
export const headerSafe = (s: string) => s.replace(/[\r\n]+/g, ' ').slice(0, 300);

export function createMailer(opts: { url?: string; host?: string; port?: number; from: string }): Mailer {
  const transport = opts.url
    ? nodemailer.createTransport(opts.url)
    : nodemailer.createTransport({
        host: opts.host ?? '127.0.0.1',
        port: opts.port,
        secure: false,
        ignoreTLS: true,
      });
  return {
    async send(msg) {
      await transport.sendMail({
        from: opts.from,
        to: msg.to,
        subject: headerSafe(msg.subject),
        text: msg.text,
        html: msg.html,
      });
    },
    close: () => transport.close(),
  };
}
