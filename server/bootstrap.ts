import { readFileSync } from 'node:fs';
import path from 'node:path';

import { migrateDatabase, openDatabase } from '../db/client';
import { createAuth } from './auth';
import type { AppContext } from './context';
import type { Env } from './env';
import { LiveHub } from './services/live';
import { createLogger } from './services/logger';

const packageVersion = (): string => {
  const pkg = JSON.parse(readFileSync(path.join(__dirname, '..', 'package.json'), 'utf8')) as { version: string };
  return pkg.version;
};

/** Opens and migrates the database and builds the services a request needs. */
export function createContext(env: Env): AppContext {
  const db = openDatabase(env.DATABASE_PATH);
  migrateDatabase(db);
  return { env, db, auth: createAuth(env, db), log: createLogger(env.LOG_LEVEL), live: new LiveHub(db), version: packageVersion() };
}
