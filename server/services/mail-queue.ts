import { and, asc, count, desc, eq, getTableColumns, inArray, isNull, lte, or } from 'drizzle-orm';

import type { Db, Executor } from '../../db/client';
import { mailQueue } from '../../db/schema';
import type { MailKind, MailLogItem, MailState, MailStatus } from '../../lib/schemas';
import type { Logger } from './logger';
import type { Mailer, OutgoingMail } from './mail';

export type MailRow = typeof mailQueue.$inferSelect;

/** A mail's columns but its body: what the logs and the sender's claim read (a digest's body is ~100 KB). */
const { payload: _payload, ...withoutPayload } = getTableColumns(mailQueue);

/** A mail to queue: what it is for, to whom, and what the sender needs to write it. */
export type QueuedMail = {
  kind: MailKind;
  ref?: string | null;
  campaignId?: string | null;
  to: string;
  toName?: string | null;
  subject: string;
  /** For rendered mails: `{ text, html, headers? }`. For invitations: the values the link is added to. */
  payload: Record<string, unknown>;
};

/**
 * Writes one mail to the queue. Call it inside the transaction of the change that causes the mail,
 * so both stand or fall together, and `kick()` the sender once that transaction has committed.
 */
export function queueMail(tx: Executor, mail: QueuedMail, now = new Date()): string {
  return tx
    .insert(mailQueue)
    .values({
      kind: mail.kind,
      ref: mail.ref ?? null,
      campaignId: mail.campaignId ?? null,
      to: mail.to,
      toName: mail.toName ?? null,
      subject: mail.subject,
      payload: mail.payload,
      state: 'queued',
      nextAttemptAt: now,
      createdAt: now,
      updatedAt: now,
    })
    .returning({ id: mailQueue.id })
    .get().id;
}

/** Cancels the mails of a thing (an invitation) that are still waiting, saying why. */
export function cancelQueuedMail(tx: Executor, ref: string, reason: string, now = new Date()): void {
  tx.update(mailQueue)
    .set({ state: 'cancelled', lastError: reason, nextAttemptAt: null, updatedAt: now })
    .where(and(eq(mailQueue.ref, ref), or(eq(mailQueue.state, 'queued'), eq(mailQueue.state, 'failed'))))
    .run();
}

export const toMailStatus = (row: Omit<MailRow, 'payload'>): MailStatus => ({
  id: row.id,
  state: row.state,
  attempts: row.attempts,
  reason: row.state === 'sent' ? null : row.lastError,
  nextAttemptAt: row.state === 'queued' && row.nextAttemptAt ? row.nextAttemptAt.toISOString() : null,
  sentAt: row.sentAt ? row.sentAt.toISOString() : null,
  updatedAt: row.updatedAt.toISOString(),
});

/** The newest mail of each of these things (invitations, digests), by ref. */
export function latestMailOf(db: Executor, refs: readonly string[]): Map<string, MailStatus> {
  const out = new Map<string, MailStatus>();
  if (refs.length === 0) return out;
  const rows = db
    .select(withoutPayload)
    .from(mailQueue)
    .where(inArray(mailQueue.ref, [...refs]))
    .orderBy(asc(mailQueue.createdAt))
    .all();
  for (const row of rows) if (row.ref) out.set(row.ref, toMailStatus(row));
  return out;
}

export function mailById(db: Executor, id: string): MailStatus | null {
  const row = db.select(withoutPayload).from(mailQueue).where(eq(mailQueue.id, id)).get();
  return row ? toMailStatus(row) : null;
}

/**
 * Puts a failed mail back in the queue for a fresh round of attempts (an invitation's mail gets a
 * new link when it goes). Mail in any other state is left as it is. Undefined when there is no such mail.
 */
export function retryMail(db: Executor, id: string, now = new Date()): MailStatus | undefined {
  db.update(mailQueue)
    .set({ state: 'queued', attempts: 0, nextAttemptAt: now, updatedAt: now })
    .where(and(eq(mailQueue.id, id), eq(mailQueue.state, 'failed')))
    .run();
  return mailById(db, id) ?? undefined;
}

/** The site administrator's log: the queue's mail newest first, and how many stand in each state. */
export function mailLog(db: Db, query: { state?: MailState; kind?: MailKind; limit: number }) {
  const where = and(query.state ? eq(mailQueue.state, query.state) : undefined, query.kind ? eq(mailQueue.kind, query.kind) : undefined);
  const items: MailLogItem[] = db
    .select(withoutPayload)
    .from(mailQueue)
    .where(where)
    .orderBy(desc(mailQueue.createdAt))
    .limit(query.limit)
    .all()
    .map((row) => ({
      ...toMailStatus(row),
      kind: row.kind,
      to: row.to,
      subject: row.subject,
      campaignId: row.campaignId,
      createdAt: row.createdAt.toISOString(),
    }));
  const counts: Record<MailState, number> = { queued: 0, sending: 0, sent: 0, failed: 0, cancelled: 0 };
  for (const { state, n } of db.select({ state: mailQueue.state, n: count() }).from(mailQueue).groupBy(mailQueue.state).all()) {
    counts[state] = n;
  }
  return { counts, items };
}

/**
 * How one kind of mail is written at the moment it is sent: `send` hands it to the mail server.
 * Answer `{ cancel }` when the mail is no longer wanted (a revoked invitation).
 */
export type MailHandler = (row: MailRow, send: (mail: OutgoingMail) => Promise<void>) => Promise<void | { cancel: string }>;

export type MailSenderOptions = {
  /** Attempts before a mail is marked failed. */
  attempts: number;
  /** The wait before the second attempt; each later wait is four times the one before. */
  retryBaseMs: number;
  /** How often the queue is looked at when nobody kicks it (mail queued by another process, retries due). */
  pollMs?: number;
  now?: () => Date;
};

export type MailSender = {
  /** Registers how a kind of mail is written (invitations need their sign-in link made at send time). */
  handle(kind: MailKind, handler: MailHandler): void;
  /** Marks mail left "sending" by a stopped server as failed, then starts sending. */
  start(): void;
  /** Looks at the queue now (after a transaction that queued mail has committed). */
  kick(): void;
  /** Stops sending; waits for a mail being handed over, up to a few seconds. */
  stop(): Promise<void>;
  /** Resolves once nothing is due or being sent (for tests and the benchmark). */
  settled(): Promise<void>;
};

/** What a mail server's refusal or a lost connection says, in one line for the log and the team screen. */
export function failureReason(err: unknown): string {
  if (!(err instanceof Error)) return 'The mail could not be sent.';
  const e = err as Error & { code?: string; responseCode?: number; response?: string };
  const parts = [e.response ?? e.message, e.code && !(e.response ?? e.message).includes(e.code) ? `(${e.code})` : ''];
  return parts.filter(Boolean).join(' ').replace(/\s+/g, ' ').trim().slice(0, 500);
}

/** A 5xx answer from the mail server is permanent (no such mailbox, refused): retrying cannot help. */
const permanent = (err: unknown) => {
  const code = (err as { responseCode?: number } | null)?.responseCode;
  return typeof code === 'number' && code >= 500 && code < 600;
};

/** Mail claimed at once, and handed to the mail server at once (its pooled connections). */
const BATCH = 20;
const PARALLEL = 4;

export const INTERRUPTED =
  'The server stopped while this mail was being handed to the mail server, so it may or may not have gone out. Send it again if it did not arrive.';

/**
 * The one sender of a server process: takes due mail from the queue one at a time, claims it (so a
 * second process on the same database cannot send it too), writes it with its kind's handler and
 * hands it to the mailer. A failure is retried with growing waits, then marked failed with the
 * reason. A mail is never sent twice: one left "sending" by a crash is marked failed, not re-sent.
 */
export function createMailSender(db: Db, mailer: Mailer, log: Logger, options: MailSenderOptions): MailSender {
  const now = options.now ?? (() => new Date());
  const pollMs = options.pollMs ?? 5000;
  const handlers = new Map<MailKind, MailHandler>();
  let started = false;
  let stopped = false;
  let timer: NodeJS.Timeout | undefined;
  let running: Promise<void> | undefined;
  let again = false;
  let waiters: (() => void)[] = [];

  const plain: MailHandler = async (row, send) => {
    const p = row.payload as { text?: string; html?: string; headers?: Record<string, string> };
    await send({
      to: row.to,
      toName: row.toName ?? undefined,
      subject: row.subject,
      text: p.text ?? '',
      html: p.html ?? '',
      headers: p.headers,
    });
  };

  const nextDue = () =>
    db
      .select({ at: mailQueue.nextAttemptAt })
      .from(mailQueue)
      .where(eq(mailQueue.state, 'queued'))
      .orderBy(asc(mailQueue.nextAttemptAt))
      .limit(1)
      .get()?.at ?? null;

  const schedule = () => {
    if (stopped || !started) return;
    clearTimeout(timer);
    const due = nextDue();
    const wait = due ? Math.max(0, Math.min(due.getTime() - now().getTime(), pollMs)) : pollMs;
    timer = setTimeout(kick, wait);
    timer.unref();
  };

  const settle = () => {
    if (running) return;
    const due = nextDue();
    if (due && due.getTime() <= now().getTime()) return;
    const w = waiters;
    waiters = [];
    for (const resolve of w) resolve();
  };

  /** What became of one attempt, written back with the others of its batch. */
  type Outcome = { row: MailRow; attempt: number } & ({ sent: true } | { cancel: string } | { err: unknown });

  async function attemptOne(row: MailRow, attempt: number): Promise<Outcome> {
    try {
      const payload = db.select({ payload: mailQueue.payload }).from(mailQueue).where(eq(mailQueue.id, row.id)).get()?.payload ?? {};
      const outcome = await (handlers.get(row.kind) ?? plain)({ ...row, payload, attempts: attempt }, (mail) => mailer.send(mail));
      return outcome && 'cancel' in outcome ? { row, attempt, cancel: outcome.cancel } : { row, attempt, sent: true };
    } catch (err) {
      return { row, attempt, err };
    }
  }

  function record(o: Outcome) {
    const at = now();
    if ('sent' in o) {
      db.update(mailQueue)
        .set({ state: 'sent', sentAt: at, lastError: null, nextAttemptAt: null, updatedAt: at })
        .where(eq(mailQueue.id, o.row.id))
        .run();
      return;
    }
    if ('cancel' in o) {
      db.update(mailQueue)
        .set({ state: 'cancelled', lastError: o.cancel, nextAttemptAt: null, updatedAt: at })
        .where(eq(mailQueue.id, o.row.id))
        .run();
      return;
    }
    const reason = failureReason(o.err);
    const last = o.attempt >= options.attempts || permanent(o.err);
    const wait = options.retryBaseMs * 4 ** (o.attempt - 1);
    log.error(last ? 'mail failed' : 'mail attempt failed, will retry', { mail: o.row.id, kind: o.row.kind, attempt: o.attempt, reason });
    db.update(mailQueue)
      .set(
        last
          ? { state: 'failed', lastError: reason, nextAttemptAt: null, updatedAt: at }
          : { state: 'queued', lastError: reason, nextAttemptAt: new Date(at.getTime() + wait), updatedAt: at },
      )
      .where(eq(mailQueue.id, o.row.id))
      .run();
  }

  /**
   * Due mail goes in batches: claimed in one transaction, handed over a few at a time on the
   * transport's pooled connections, and the outcomes written in one transaction, so a batch costs
   * two commits to disk rather than two per mail. A crash between handing over and writing the
   * outcome leaves the mail "sending", which the next start marks failed, never re-sent.
   */
  async function drain() {
    do {
      again = false;
      for (;;) {
        if (stopped) return;
        // A batch is claimed without its mails' bodies: each body is read just before it is sent,
        // so a batch of digests (about 100 KB each) is never held in memory at once.
        const due: MailRow[] = db
          .select(withoutPayload)
          .from(mailQueue)
          .where(and(eq(mailQueue.state, 'queued'), or(isNull(mailQueue.nextAttemptAt), lte(mailQueue.nextAttemptAt, now()))))
          .orderBy(asc(mailQueue.nextAttemptAt))
          .limit(BATCH)
          .all()
          .map((row) => ({ ...row, payload: {} }));
        if (due.length === 0) break;
        const claimed = db.transaction(() =>
          due.filter(
            (row) =>
              db
                .update(mailQueue)
                .set({ state: 'sending', attempts: row.attempts + 1, updatedAt: now() })
                .where(and(eq(mailQueue.id, row.id), eq(mailQueue.state, 'queued')))
                .run().changes === 1,
          ),
        );
        const outcomes: Outcome[] = [];
        for (let i = 0; i < claimed.length; i += PARALLEL) {
          outcomes.push(...(await Promise.all(claimed.slice(i, i + PARALLEL).map((row) => attemptOne(row, row.attempts + 1)))));
        }
        db.transaction(() => outcomes.forEach(record));
      }
    } while (again && !stopped);
  }

  function kick() {
    if (stopped || !started) return;
    if (running) {
      again = true;
      return;
    }
    running = drain()
      .catch((err: unknown) => log.error('mail sender stopped on an error', { err }))
      .finally(() => {
        running = undefined;
        schedule();
        settle();
      });
  }

  return {
    handle(kind, handler) {
      handlers.set(kind, handler);
    },
    start() {
      if (started) return;
      started = true;
      const interrupted = db
        .update(mailQueue)
        .set({ state: 'failed', lastError: INTERRUPTED, nextAttemptAt: null, updatedAt: now() })
        .where(eq(mailQueue.state, 'sending'))
        .run();
      if (interrupted.changes > 0) log.error('mail left half-sent by a stopped server marked failed', { count: interrupted.changes });
      kick();
    },
    kick: () => void setImmediate(kick),
    async stop() {
      stopped = true;
      clearTimeout(timer);
      if (running) await Promise.race([running, new Promise((r) => setTimeout(r, 5000).unref())]);
      const w = waiters;
      waiters = [];
      for (const resolve of w) resolve();
    },
    settled() {
      return new Promise<void>((resolve) => {
        waiters.push(resolve);
        settle();
      });
    },
  };
}
