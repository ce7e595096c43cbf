/**
 * The local fake mail server: a real SMTP server (smtp-server) started in-process that stores every
 * message it receives in mail_messages, where an admin reads them on the outbox page and tests
 * read them to follow verification, reset and invitation links.
 */
import { SMTPServer } from 'smtp-server';
import { simpleParser } from 'mailparser';
import type { Db } from '../db/client';
import { mailMessages } from '../db/schema';

export interface FakeSmtp {
  port: number;
  close(): Promise<void>;
}

export async function startFakeSmtp(db: Db, port = 0, host = '127.0.0.1'): Promise<FakeSmtp> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'], // the package's built-in certificate has expired
    logger: false,
    size: 5 * 1024 * 1024,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (m) => {
          const to = session.envelope.rcptTo.map((r) => r.address).join(', ');
          const from = session.envelope.mailFrom ? session.envelope.mailFrom.address : '';
          await db.insert(mailMessages).values({
            from,
            to,
            subject: m.subject ?? '',
            text: m.text ?? '',
            html: typeof m.html === 'string' ? m.html : null,
          });
          callback();
        })
        .catch((e: Error) => callback(e));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => resolve());
  });
  const addr = server.server.address();
  const actual = typeof addr === 'object' && addr ? addr.port : port;
  return {
    port: actual,
    close: () => new Promise((resolve) => server.close(() => resolve())),
  };
}
