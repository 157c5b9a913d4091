/**
 * Migrates the database and, with the demo on, seeds it; run by the server in a child process
 * before it opens the database itself. The migrator and the seed (its templates, the password
 * hashing, the demo log) leave heap and allocator pages behind that a long-running process would
 * keep for good; a child gives all of it back when it exits.
 *
 * Tells its parent over IPC what to print: whether it seeded, and the demo sign-ins.
 */
import { readdirSync, rmSync } from 'node:fs';
import path from 'node:path';

import { migrateDatabase, openDatabase } from '../db/client';
import { demoSignIns, DEMO_PASSWORD, seedDemo } from '../db/seed';
import { loadEnv } from './env';

export type PreparedDatabase = {
  seeded: boolean;
  observations: number;
  /** The demo's sign-ins and their one password, when the demo is on. */
  demo: { password: string; signIns: { email: string; role: string }[] } | null;
};

export type PrepareMessage = { ok: true; prepared: PreparedDatabase } | { ok: false; message: string };

/** Staging files of telemetry imports cut short by a crash or a kill (see telemetry-import.ts). */
function removeStaleStaging(databasePath: string): void {
  if (databasePath === ':memory:') return;
  const dir = path.dirname(path.resolve(databasePath));
  for (const name of readdirSync(dir)) {
    if (name.startsWith('.bathynote-import-')) rmSync(path.join(dir, name), { force: true });
  }
}

async function prepare(): Promise<PreparedDatabase> {
  const env = loadEnv();
  const db = openDatabase(env.DATABASE_PATH);
  removeStaleStaging(env.DATABASE_PATH);
  try {
    migrateDatabase(db);
    if (!env.BATHYNOTE_DEMO) return { seeded: false, observations: 0, demo: null };
    const { seeded, observations } = await seedDemo(db, { watchPlan: env.BATHYNOTE_DEMO_WATCHES });
    return { seeded, observations, demo: { password: DEMO_PASSWORD, signIns: demoSignIns } };
  } finally {
    db.$client.close();
  }
}

const send = (message: PrepareMessage) =>
  new Promise<void>((resolve) => {
    if (process.send) process.send(message, () => resolve());
    else {
      process.stdout.write(`${JSON.stringify(message)}\n`);
      resolve();
    }
  });

prepare().then(
  async (prepared) => {
    await send({ ok: true, prepared });
    process.exit(0);
  },
  async (err: unknown) => {
    await send({ ok: false, message: err instanceof Error ? err.message : String(err) });
    process.exit(1);
  },
);
