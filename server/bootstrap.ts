import { readFileSync } from 'node:fs';
import path from 'node:path';

import { migrateDatabase, openDatabase } from '../db/client';
import { createAuth, MagicLinkPostbox } from './auth';
import type { AppContext } from './context';
import type { Env } from './env';
import { sessionCacheFor } from './middleware/session';
import { LiveHub } from './services/live';
import { createLogger } from './services/logger';
import { createMailer } from './services/mail';
import { createDigestScheduler, digestMailHandler } from './services/digests';
import { createHandoverScheduler } from './services/handovers';
import { createMailSender } from './services/mail-queue';
import { checkpointerOf, startCheckpointer } from './services/checkpointer';
import { signInLinkMailHandler } from './services/sign-in-links';
import { invitationMailHandler } from './services/team';
import { projectRoot } from '../db/root';

const packageVersion = (): string => {
  const pkg = JSON.parse(readFileSync(path.join(projectRoot, 'package.json'), 'utf8')) as { version: string };
  return pkg.version;
};

/**
 * Opens and migrates the database and builds the services a request needs. `now` is the clock of
 * the digest schedule (tests set it to cross a daylight-saving change); `migrate: false` when the
 * database was migrated already (the server does it in a child process).
 */
export async function createContext(env: Env, options: { now?: () => Date; migrate?: boolean } = {}): Promise<AppContext> {
  const db = openDatabase(env.DATABASE_PATH);
  if (options.migrate !== false) migrateDatabase(db);
  const log = createLogger(env.LOG_LEVEL);
  startCheckpointer(db, env.DATABASE_PATH, log);
  const postbox = new MagicLinkPostbox();
  const mailer = await createMailer(db, log, env.SMTP_URL);
  const live = new LiveHub(db);
  const auth = createAuth(env, db, postbox, (token) => live.endSession(token));
  // A session that ended is refused on its next request, not only once its cached check runs out.
  live.onSessionEnded((token) => sessionCacheFor(auth).forgetToken(token));
  const ctx: AppContext = {
    env,
    db,
    auth,
    log,
    live,
    mailer,
    mail: createMailSender(db, mailer, log, { attempts: env.MAIL_ATTEMPTS, retryBaseMs: env.MAIL_RETRY_BASE_MS }),
    digests: createDigestScheduler({ db, publicUrl: env.PUBLIC_URL, secret: env.AUTH_SECRET }, log, () => ctx.mail.kick(), options.now),
    handovers: createHandoverScheduler(db, live, log, env.PUBLIC_URL, () => ctx.mail.kick(), options.now),
    postbox,
    version: packageVersion(),
  };
  ctx.mail.handle('invitation', invitationMailHandler(ctx));
  ctx.mail.handle('digest', digestMailHandler(db));
  ctx.mail.handle('sign-in-link', signInLinkMailHandler(ctx));
  ctx.mail.start();
  ctx.digests.start();
  ctx.handovers.start();
  return ctx;
}

/** Stops what runs in the background (the digest and handover schedules, the mail sender), closes the mail transport and the database. */
export async function closeContext(ctx: AppContext): Promise<void> {
  ctx.digests.stop();
  ctx.handovers.stop();
  await ctx.mail.stop();
  await ctx.mailer.close();
  // The checkpoint worker's connections close first, so the server's stays the last one.
  await checkpointerOf(ctx.db)?.stop();
  ctx.db.$client.close();
}
