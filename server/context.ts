import type { Db } from '../db/client';
import type { Auth, MagicLinkPostbox } from './auth';
import type { Env } from './env';
import type { LiveHub } from './services/live';
import type { Logger } from './services/logger';
import type { Mailer } from './services/mail';
import type { DigestScheduler } from './services/digests';
import type { HandoverScheduler } from './services/handovers';
import type { MailSender } from './services/mail-queue';

/** Everything a request handler may need, built once at start (or per test). */
export type AppContext = {
  env: Env;
  db: Db;
  auth: Auth;
  log: Logger;
  live: LiveHub;
  mailer: Mailer;
  /** The mail queue's sender: `kick()` it after a transaction that queued mail has committed. */
  mail: MailSender;
  /** The daily digests' schedule (`tick(now)` runs it at a given instant). */
  digests: DigestScheduler;
  /** The handover notes at each change of watch (`tick(now)` runs it at a given instant). */
  handovers: HandoverScheduler;
  postbox: MagicLinkPostbox;
  version: string;
};
