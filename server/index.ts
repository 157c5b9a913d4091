import { createServer } from 'node:http';

import { demoSignIns, DEMO_PASSWORD, seedDemo } from '../db/seed';
import { createApp } from './app';
import { createContext } from './bootstrap';
import { loadEnv } from './env';

async function main() {
  const env = loadEnv();
  const ctx = await createContext(env);
  if (env.BATHYNOTE_DEMO) {
    const { seeded, observations } = await seedDemo(ctx.db);
    if (seeded) ctx.log.info('seeded the demo campaigns', { observations });
  }
  const server = createServer(createApp(ctx));
  server.listen(env.PORT, env.HOST, () => {
    const lines = [
      '',
      `  Bathynote ${ctx.version} is running at ${env.PUBLIC_URL}`,
      `  database: ${env.DATABASE_PATH}   uploads: ${env.UPLOADS_DIR}`,
      `  mail: ${ctx.mailer.catching ? 'caught by the built-in mail catcher (site administrators read it under Admin → Outbox)' : 'sent through SMTP_URL'}`,
    ];
    if (env.BATHYNOTE_DEMO) {
      lines.push('', `  Demo sign-ins (password "${DEMO_PASSWORD}" for all):`);
      for (const s of demoSignIns) lines.push(`    ${s.email.padEnd(30)} ${s.role}`);
    }
    process.stdout.write(`${lines.join('\n')}\n\n`);
  });

  const shutdown = (signal: string) => {
    ctx.log.info('shutting down', { signal });
    server.close(() => {
      void ctx.mailer.close().finally(() => {
        ctx.db.$client.close();
        process.exit(0);
      });
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
