import { readFileSync } from 'node:fs';
import path from 'node:path';

import { migrateDatabase, openDatabase } from '../db/client';
import { createAuth, MagicLinkPostbox } from './auth';
import type { AppContext } from './context';
import type { Env } from './env';
import { LiveHub } from './services/live';
import { createLogger } from './services/logger';
import { createMailer } from './services/mail';
import { projectRoot } from '../db/root';

const packageVersion = (): string => {
  const pkg = JSON.parse(readFileSync(path.join(projectRoot, 'package.json'), 'utf8')) as { version: string };
  return pkg.version;
};

/** Opens and migrates the database and builds the services a request needs. */
export async function createContext(env: Env): Promise<AppContext> {
  const db = openDatabase(env.DATABASE_PATH);
  migrateDatabase(db);
  const log = createLogger(env.LOG_LEVEL);
  const postbox = new MagicLinkPostbox();
  return {
    env,
    db,
    auth: createAuth(env, db, postbox),
    log,
    live: new LiveHub(db),
    mailer: await createMailer(db, log, env.SMTP_URL),
    postbox,
    version: packageVersion(),
  };
}
