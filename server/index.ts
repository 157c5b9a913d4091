// First, so that the young generation is limited before any module allocates.
import { letYoungGenerationGrow } from './young-generation';

import { fork } from 'node:child_process';
import { existsSync } from 'node:fs';
import type { RequestListener } from 'node:http';
import path from 'node:path';

import Database from 'better-sqlite3';

import { createApp } from './app';
import { closeContext, createContext } from './bootstrap';
import { loadEnv } from './env';
import { errorBody } from './errors';
import { bornFor, createHttpServer } from './http-server';
import { startDemoLive } from './services/demo-live';
import { Mirror } from './mirror/mirror';
import { sessionCacheFor } from './middleware/session';
import type { PrepareMessage, PreparedDatabase } from './prepare-database';

/** Until the database is open and migrated, every request is told to come back in a moment. */
const starting: RequestListener = (_req, res) => {
  res.writeHead(503, {
    'content-type': 'application/json; charset=utf-8',
    'retry-after': '2',
    'cache-control': 'no-store',
    'x-content-type-options': 'nosniff',
  });
  res.end(JSON.stringify(errorBody('starting', 'Bathynote is starting; try again in a moment.')));
};

/**
 * Migrates and (with the demo on) seeds the database in a child process, so that what the
 * migrator and the seed hold is given back when the child exits instead of staying in the
 * server's heap. The child is this file's sibling: the bundle's in `build/`, or the source under tsx.
 */
function prepareDatabase(): Promise<PreparedDatabase> {
  const script = path.join(__dirname, `prepare-database${path.extname(__filename)}`);
  return new Promise((resolve, reject) => {
    let answer: PrepareMessage | undefined;
    const child = fork(script, [], { stdio: ['ignore', 'inherit', 'inherit', 'ipc'] });
    child.on('message', (message: PrepareMessage) => (answer = message));
    child.once('error', reject);
    child.once('exit', (code, signal) => {
      if (answer?.ok) resolve(answer.prepared);
      else reject(new Error(answer?.message ?? `preparing the database stopped (${signal ?? `exit code ${code}`})`));
    });
  });
}

async function main() {
  const env = loadEnv();
  // The port is taken first, so that nothing started below (the mail catcher takes a free port of
  // its own) can land on it, and so that a port already in use is reported before any work is done.
  let handle = starting;
  const server = createHttpServer((req, res) => handle(req, res));
  await new Promise<void>((resolve, reject) => {
    const failed = (err: NodeJS.ErrnoException) =>
      reject(
        err.code === 'EADDRINUSE'
          ? new Error(`port ${env.PORT} on ${env.HOST} is already in use; stop what holds it, or set PORT to another port`)
          : err,
      );
    server.once('error', failed);
    server.listen(env.PORT, env.HOST, () => {
      // Later errors are the running server's, not a failed start.
      server.off('error', failed);
      resolve();
    });
  });
  // A shore mirror's record is the ship's, restored: it is neither migrated nor seeded here.
  const mirror = env.MIRROR_OF && env.REPLICA ? new Mirror(mirrorSettings(env)) : undefined;
  if (mirror) await mirror.prepare((line) => process.stdout.write(`  ${line}\n`));
  // An existing database is held open (with a read done, so this connection keeps its shared lock)
  // while the child prepares it: the child's connection is then never the last to close, and a
  // last close would checkpoint the WAL away. Under Litestream that would end its generation and
  // send the whole database across the link again; Litestream opens the file only a moment later.
  const hold = !mirror && existsSync(env.DATABASE_PATH) ? new Database(env.DATABASE_PATH, { fileMustExist: true }) : undefined;
  hold?.prepare('select count(*) from sqlite_master').get();
  const prepared: PreparedDatabase = mirror ? { seeded: false, observations: 0, demo: null } : await prepareDatabase();
  const ctx = await createContext(env, { migrate: false });
  ctx.db.$client.prepare('select count(*) from sqlite_master').get();
  hold?.close();
  if (prepared.seeded) ctx.log.info('seeded the demo campaigns', { observations: prepared.observations });
  if (mirror) {
    // The ship sends the mail and the digests and writes the handover notes; the shore copy must
    // not do any of it again (what it wrote would be lost at the next copy anyway).
    ctx.digests.stop();
    ctx.handovers.stop();
    await ctx.mail.stop();
    // A session ended on the ship ends here with the next copy, not when its cached check runs out.
    mirror.onSwap(() => sessionCacheFor(ctx.auth).clear());
    mirror.start(ctx.db, ctx.live, ctx.log);
  }
  const app = createApp(ctx, { mirror });
  const demoLive = await startDemoLive(mirror ? { ...ctx, env: { ...env, BATHYNOTE_DEMO_LIVE: false } } : ctx);
  const lines = [
    '',
    `  Bathynote ${ctx.version} is running at ${env.PUBLIC_URL}`,
    `  database: ${env.DATABASE_PATH}   uploads: ${env.UPLOADS_DIR}`,
    ...(mirror ? [`  shore copy of ${env.MIRROR_OF}, restored from ${env.REPLICA} every ${env.MIRROR_RESTORE_INTERVAL_MS / 1000} s`] : []),
    `  mail: ${ctx.mailer.catching ? 'caught by the built-in mail catcher (site administrators read it under Admin → Mail log)' : 'sent through SMTP_URL'}`,
  ];
  if (prepared.demo) {
    lines.push('', `  Demo sign-ins (password "${prepared.demo.password}" for all):`);
    for (const s of prepared.demo.signIns) lines.push(`    ${s.email.padEnd(30)} ${s.role}`);
    if (demoLive.diveNumber)
      lines.push(
        '',
        `  Dive ${demoLive.diveNumber} is under way: two colleagues log an entry every 20–60 s (BATHYNOTE_DEMO_LIVE=0 turns it off).`,
      );
  }
  process.stdout.write(`${lines.join('\n')}\n\n`);
  bornFor(server, app);
  handle = app;
  letYoungGenerationGrow();

  const shutdown = (signal: string) => {
    ctx.log.info('shutting down', { signal });
    mirror?.stop();
    server.close(() => {
      void demoLive
        .stop()
        .then(() => closeContext(ctx))
        .finally(() => process.exit(0));
    });
    server.closeAllConnections();
    // Connections that will not close are cut after five seconds.
    setTimeout(() => process.exit(0), 5000);
  };
  process.on('SIGTERM', () => shutdown('SIGTERM'));
  process.on('SIGINT', () => shutdown('SIGINT'));
}

function mirrorSettings(env: ReturnType<typeof loadEnv>) {
  return {
    of: env.MIRROR_OF!,
    replica: env.REPLICA!,
    databasePath: env.DATABASE_PATH,
    intervalMs: env.MIRROR_RESTORE_INTERVAL_MS,
    key: env.MIRROR_KEY,
  };
}

main().catch((err: unknown) => {
  process.stderr.write(`Bathynote could not start: ${err instanceof Error ? err.message : String(err)}\n`);
  process.exit(1);
});
