import type { AddressInfo } from 'node:net';

import { desc } from 'drizzle-orm';
import type * as Mailparser from 'mailparser';
import nodemailer, { type Transporter } from 'nodemailer';
import { SMTPServer } from 'smtp-server';

import type { Db } from '../../db/client';
import { caughtMail } from '../../db/schema';
import type { Logger } from './logger';

export type OutgoingMail = {
  to: string;
  toName?: string;
  subject: string;
  text: string;
  html: string;
  /** Extra headers (a digest's List-Unsubscribe); their values are kept to one line like the others. */
  headers?: Record<string, string>;
};

export type CaughtMail = {
  id: string;
  to: string;
  from: string;
  subject: string;
  text: string;
  html: string;
  headers: Record<string, string>;
  receivedAt: string;
};

export type Mailer = {
  send(mail: OutgoingMail): Promise<void>;
  /** True while the built-in mail catcher stands in for a real mail server. */
  readonly catching: boolean;
  /** What the built-in catcher caught, newest first (empty when mail goes out through SMTP_URL). */
  caught(limit?: number): CaughtMail[];
  close(): Promise<void>;
};

const FROM = { name: 'Bathynote', address: 'no-reply@bathynote.local' };

/** Header values never carry line breaks: a name with "\r\nBcc:" in it stays one harmless line. */
export const headerSafe = (value: string) => value.replace(/[\r\n\u2028\u2029]+/g, ' ').trim();

/**
 * Mail goes out through `SMTP_URL` when it is set. Otherwise a local SMTP server on 127.0.0.1
 * (smtp-server) catches every message, parses it (mailparser) and keeps it in the database, so
 * invitations and digests can be read in the site administrator's mail log and checked by tests.
 */
export async function createMailer(db: Db, log: Logger, smtpUrl: string | undefined): Promise<Mailer> {
  let catcher: SMTPServer | undefined;
  let transport: Transporter;
  if (smtpUrl) {
    // Pooled: a digest run hands hundreds of mails over a few kept connections, not one each.
    const url = new URL(smtpUrl);
    url.searchParams.set('pool', 'true');
    url.searchParams.set('maxConnections', '4');
    transport = nodemailer.createTransport(url.toString());
  } else {
    catcher = new SMTPServer({
      authOptional: true,
      disabledCommands: ['STARTTLS', 'AUTH'],
      size: 10 * 1024 * 1024,
      logger: false,
      onData(stream, _session, callback) {
        // Required on the first mail caught, not at start: the parser and its dependencies are
        // a few megabytes that a server which never sends mail need not hold.
        const { simpleParser } = require('mailparser') as typeof Mailparser;
        simpleParser(stream)
          .then((parsed) => {
            const headers: Record<string, string> = {};
            for (const line of parsed.headerLines) headers[line.key] = line.line.slice(line.key.length + 1).trim();
            const to = Array.isArray(parsed.to) ? parsed.to.map((a) => a.text).join(', ') : (parsed.to?.text ?? '');
            db.insert(caughtMail)
              .values({
                to,
                from: parsed.from?.text ?? '',
                subject: parsed.subject ?? '',
                text: parsed.text ?? '',
                html: typeof parsed.html === 'string' ? parsed.html : '',
                headers,
                receivedAt: new Date(),
              })
              .run();
            callback();
          })
          .catch((err: unknown) => {
            log.error('mail catcher could not read a message', { err });
            callback(err instanceof Error ? err : new Error('unreadable message'));
          });
      },
    });
    const server = catcher;
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
    const { port } = server.server.address() as AddressInfo;
    transport = nodemailer.createTransport({ host: '127.0.0.1', port, secure: false, ignoreTLS: true, pool: true, maxConnections: 4 });
    log.info('mail catcher listening (no SMTP_URL set)', { port });
  }

  return {
    catching: !!catcher,
    async send(mail) {
      await transport.sendMail({
        from: FROM,
        to: mail.toName ? { name: headerSafe(mail.toName), address: mail.to } : mail.to,
        subject: headerSafe(mail.subject),
        text: mail.text,
        html: mail.html,
        ...(mail.headers
          ? { headers: Object.fromEntries(Object.entries(mail.headers).map(([k, v]) => [headerSafe(k), headerSafe(v)])) }
          : {}),
      });
    },
    caught(limit = 200) {
      return db
        .select()
        .from(caughtMail)
        .orderBy(desc(caughtMail.receivedAt))
        .limit(limit)
        .all()
        .map((m) => ({ ...m, receivedAt: m.receivedAt.toISOString() }));
    },
    async close() {
      transport.close();
      if (catcher) await new Promise<void>((resolve) => catcher.close(() => resolve()));
    },
  };
}
