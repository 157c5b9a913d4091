import type { RequestListener } from 'node:http';

import { demoSignIns, DEMO_PASSWORD, seedDemo } from '../db/seed';
import { createApp } from './app';
import { closeContext, createContext } from './bootstrap';
import { loadEnv } from './env';
import { errorBody } from './errors';
import { createHttpServer } from './http-server';

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
  const ctx = await createContext(env);
  if (env.BATHYNOTE_DEMO) {
    const { seeded, observations } = await seedDemo(ctx.db);
    if (seeded) ctx.log.info('seeded the demo campaigns', { observations });
  }
  const app = createApp(ctx);
  const lines = [
    '',
    `  Bathynote ${ctx.version} is running at ${env.PUBLIC_URL}`,
    `  database: ${env.DATABASE_PATH}   uploads: ${env.UPLOADS_DIR}`,
    `  mail: ${ctx.mailer.catching ? 'caught by the built-in mail catcher (site administrators read it under Admin → Mail log)' : 'sent through SMTP_URL'}`,
  ];
  if (env.BATHYNOTE_DEMO) {
    lines.push('', `  Demo sign-ins (password "${DEMO_PASSWORD}" for all):`);
    for (const s of demoSignIns) lines.push(`    ${s.email.padEnd(30)} ${s.role}`);
  }
  process.stdout.write(`${lines.join('\n')}\n\n`);
  handle = app;

  const shutdown = (signal: string) => {
    ctx.log.info('shutting down', { signal });
    server.close(() => {
      void closeContext(ctx).finally(() => process.exit(0));
    });
    server.closeAllConnections();
    // Connections that will not close are cut after five seconds.
    setTimeout(() => process.exit(0), 5000);
  };
  process.on('SIGTERM', () => shutdown('SIGTERM'));
  process.on('SIGINT', () => shutdown('SIGINT'));
}

main().catch((err: unknown) => {
  process.stderr.write(`Bathynote could not start: ${err instanceof Error ? err.message : String(err)}\n`);
  process.exit(1);
});
