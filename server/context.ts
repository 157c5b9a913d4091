import type { Db } from '../db/client';
import type { Auth } from './auth';
import type { Env } from './env';
import type { LiveHub } from './services/live';
import type { Logger } from './services/logger';

/** Everything a request handler may need, built once at start (or per test). */
export type AppContext = {
  env: Env;
  db: Db;
  auth: Auth;
  log: Logger;
  live: LiveHub;
  version: string;
};
