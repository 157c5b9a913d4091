/** A real SMTP server for tests (smtp-server, each mail parsed by mailparser), started and stopped on one port. */
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';

export type Received = { to: string; subject: string; text: string };

/** A real SMTP server (smtp-server, parsed by mailparser) that can be started and stopped on one port. */
export function smtpOn(port: number) {
  const received: Received[] = [];
  let server: SMTPServer | undefined;
  return {
    received,
    async start() {
      server = new SMTPServer({
        authOptional: true,
        disabledCommands: ['STARTTLS', 'AUTH'],
        logger: false,
        onData(stream, _session, done) {
          simpleParser(stream)
            .then((m) => {
              received.push({
                to: Array.isArray(m.to) ? m.to.map((a) => a.text).join(', ') : (m.to?.text ?? ''),
                subject: m.subject ?? '',
                text: m.text ?? '',
              });
              done();
            })
            .catch(done);
        },
      });
      const s = server;
      await new Promise<void>((resolve) => s.listen(port, '127.0.0.1', resolve));
    },
    async stop() {
      const s = server;
      if (!s) return;
      const closed = new Promise<void>((resolve) => s.close(() => resolve()));
      // The sender keeps pooled connections open; a mail server going down drops them.
      for (const c of (s as unknown as { connections: Set<{ close: () => void }> }).connections) c.close();
      await closed;
      server = undefined;
    },
  };
}
