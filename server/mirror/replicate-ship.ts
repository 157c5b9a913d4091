/**
 * `npm start` on a ship with `REPLICATE_TO`: prepares the database, then runs the server under
 * Litestream's `replicate -exec`, so the replica starts and stops with the server, and sends the
 * photos to the shore by rsync beside it. This process only supervises: the server is
 * Litestream's child and answers requests as it does without replication.
 */
import { fork, spawn } from 'node:child_process';
import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';

import { litestreamBinary, litestreamConfig, type ShipSettings, startPhotoShipper } from './replicate';

const say = (line: string) => process.stderr.write(`${line}\n`);

/**
 * Migrates (and with the demo on, seeds) before Litestream opens the file: Litestream needs a
 * database in WAL mode to follow, and the first snapshot should hold the schema, not an empty file.
 */
function prepare(buildDir: string): Promise<void> {
  return new Promise((resolve, reject) => {
    let answer: { ok: boolean; message?: string } | undefined;
    const child = fork(path.join(buildDir, 'prepare-database.cjs'), [], { stdio: ['ignore', 'ignore', 'inherit', 'ipc'] });
    child.on('message', (m: { ok: boolean; message?: string }) => (answer = m));
    child.once('error', reject);
    child.once('exit', (code) =>
      answer?.ok ? resolve() : reject(new Error(answer?.message ?? `preparing the database stopped (exit code ${code})`)),
    );
  });
}

/** Quotes one word for Litestream's -exec, which splits its command the way a shell does. */
const word = (s: string) => `'${s.replace(/'/g, `'\\''`)}'`;

export async function runShip(settings: ShipSettings, buildDir: string): Promise<never> {
  // Only a new database is prepared before Litestream starts. An existing one is left alone until
  // Litestream holds it: the last connection to close checkpoints the WAL away, and Litestream,
  // finding its place in the WAL gone, would start a new generation and send the whole database
  // across the link again. The server prepares it again under Litestream (then nothing is to do).
  if (!existsSync(settings.databasePath)) await prepare(buildDir);
  const config = path.join(path.dirname(settings.databasePath), 'litestream.yml');
  mkdirSync(path.dirname(config), { recursive: true });
  writeFileSync(config, litestreamConfig(settings), { mode: 0o600 });
  if (settings.target.kind === 'file') mkdirSync(settings.target.dir, { recursive: true });

  const server = `${word(process.execPath)} ${word(path.join(buildDir, 'server.cjs'))}`;
  const litestream = spawn(litestreamBinary(), ['replicate', '-no-expand-env', '-config', config, '-exec', server], {
    stdio: ['ignore', 'inherit', 'inherit'],
  });
  const where =
    settings.target.kind === 'file' ? settings.target.dir : `${settings.target.user}@${settings.target.host}:${settings.target.dir}`;
  say(`  the record and photos go to the shore copy at ${where} (Litestream, rsync)`);
  const photos = startPhotoShipper(settings, say);

  for (const signal of ['SIGTERM', 'SIGINT'] as const)
    process.on(signal, () => {
      litestream.kill(signal);
      // Litestream's last sync can wait on a dead link for good; what it has not sent stays in its
      // WAL copy beside the database and goes at the next start, so it is stopped after a while.
      setTimeout(() => litestream.kill('SIGKILL'), 20_000).unref();
    });
  const code = await new Promise<number>((resolve) => {
    litestream.once('error', (err) => {
      say(`Bathynote could not start Litestream: ${err.message}`);
      resolve(1);
    });
    litestream.once('exit', (c, signal) => resolve(c ?? (signal ? 1 : 0)));
  });
  await photos.stop();
  process.exit(code);
}
