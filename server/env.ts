import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { z } from 'zod';

const flag = z.enum(['0', '1', 'true', 'false']).transform((v) => v === '1' || v === 'true');

const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  PORT: z.coerce.number().int().min(0).max(65535).default(8080),
  HOST: z.string().min(1).default('127.0.0.1'),
  DATABASE_PATH: z.string().min(1).default('data/bathynote.db'),
  UPLOADS_DIR: z.string().min(1).default('uploads/'),
  SMTP_URL: z.url({ protocol: /^smtps?$/ }).optional(),
  BATHYNOTE_DEMO: flag.default(false),
  /** With the demo on: a simulated dive under way, its telemetry growing and two colleagues logging entries (0 turns it off). */
  BATHYNOTE_DEMO_LIVE: flag.default(true),
  /** With the demo on: the 2026 campaign's watch plan, so handover notes are written at each change of watch (0 leaves it out). */
  BATHYNOTE_DEMO_WATCHES: flag.default(true),
  AUTH_SECRET: z.string().min(32).optional(),
  /** The origin people open in the browser; defaults to http://HOST:PORT. */
  PUBLIC_URL: z.url({ protocol: /^https?$/ }).optional(),
  /** Express "trust proxy" setting: unset trusts no proxy, so X-Forwarded-For is ignored. */
  TRUST_PROXY: z.string().optional(),
  /** Folder of the web export served on the same port. */
  WEB_DIR: z.string().min(1).default('dist'),
  /** Sign-in attempts allowed per client address per minute. */
  AUTH_RATE_LIMIT: z.coerce.number().int().min(1).default(20),
  /** API requests allowed per client address per minute (a whole ship may share one address). */
  API_RATE_LIMIT: z.coerce.number().int().min(1).default(6000),
  /** How often a live stream sends a keep-alive and checks that its session still stands. */
  STREAM_HEARTBEAT_MS: z.coerce.number().int().min(100).max(25_000).default(20_000),
  /** Live streams open at once per session and per person (a newer one closes the oldest), and in all (more is a 429). */
  STREAM_MAX_PER_SESSION: z.coerce.number().int().min(1).default(4),
  STREAM_MAX_PER_PERSON: z.coerce.number().int().min(1).default(24),
  STREAM_MAX_TOTAL: z.coerce.number().int().min(1).default(4000),
  LOG_LEVEL: z.enum(['silent', 'error', 'info']).default('info'),
  /** Attempts at sending one mail before it is marked failed. */
  MAIL_ATTEMPTS: z.coerce.number().int().min(1).max(20).default(5),
  /** The wait before a mail's second attempt; each later wait is four times longer (30 s, 2 min, 8 min, 32 min). */
  MAIL_RETRY_BASE_MS: z.coerce.number().int().min(10).default(30_000),
  /** Shore mirror: the ship's public URL; with REPLICA set, this server serves a restored copy of the ship's record. */
  MIRROR_OF: z.url({ protocol: /^https?$/ }).optional(),
  /** Shore mirror: the directory where the ship's replica arrives (`db/` from Litestream, `photos/` from rsync). */
  REPLICA: z.string().min(1).optional(),
  /** Shared by ship and mirror: the ship opens its stream of every dive's events to the holder of this key. */
  MIRROR_KEY: z.string().min(16).optional(),
  /** Shore mirror: how often the copy is restored from the replica. */
  MIRROR_RESTORE_INTERVAL_MS: z.coerce.number().int().min(1000).default(15_000),
});

export type Env = z.infer<typeof envSchema> & {
  AUTH_SECRET: string;
  PUBLIC_URL: string;
  dataDir: string;
};

/** Reads and validates the environment once; the only place that touches `process.env`. */
export function loadEnv(source: NodeJS.ProcessEnv = process.env): Env {
  const parsed = envSchema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`);
    throw new Error(`Invalid environment:\n${lines.join('\n')}`);
  }
  const env = parsed.data;
  if ((env.MIRROR_OF === undefined) !== (env.REPLICA === undefined))
    throw new Error('Invalid environment: a shore mirror needs both MIRROR_OF and REPLICA');
  // A mirror serves the photos the ship's rsync passes bring, unless told otherwise.
  if (env.REPLICA && source.UPLOADS_DIR === undefined) env.UPLOADS_DIR = path.join(env.REPLICA, 'photos');
  const dataDir = path.dirname(path.resolve(env.DATABASE_PATH));
  const host = env.HOST === '0.0.0.0' || env.HOST === '::' ? 'localhost' : env.HOST;
  return {
    ...env,
    dataDir,
    AUTH_SECRET: env.AUTH_SECRET ?? persistentSecret(dataDir),
    PUBLIC_URL: (env.PUBLIC_URL ?? `http://${host}:${env.PORT}`).replace(/\/$/, ''),
    MIRROR_OF: env.MIRROR_OF?.replace(/\/$/, ''),
  };
}

/** A secret generated on first start and kept beside the database, so sessions survive restarts. */
function persistentSecret(dataDir: string): string {
  const file = path.join(dataDir, 'auth-secret');
  if (existsSync(file)) return readFileSync(file, 'utf8').trim();
  mkdirSync(dataDir, { recursive: true });
  const secret = randomBytes(32).toString('base64url');
  writeFileSync(file, secret, { mode: 0o600 });
  return secret;
}
