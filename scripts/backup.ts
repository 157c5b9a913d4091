/** `npm run db:backup -- <file>`: an online backup of the database, safe while the server runs. */
import path from 'node:path';

import { backupDatabase, checkBackup } from '../db/backup';
import { openDatabase } from '../db/client';
import { loadEnv } from '../server/env';

async function main() {
  const env = loadEnv();
  const stamp = new Date().toISOString().replace(/[:.]/g, '-');
  const destination = process.argv[2] ?? path.join(env.dataDir, 'backups', `bathynote-${stamp}.db`);
  const db = openDatabase(env.DATABASE_PATH);
  const { pages } = await backupDatabase(db, destination);
  db.$client.close();
  checkBackup(destination);
  process.stdout.write(`Backed up ${env.DATABASE_PATH} (${pages} pages) to ${destination}\n`);
  process.stdout.write(`Photos live in ${env.UPLOADS_DIR}; copy that folder too (e.g. rsync -a ${env.UPLOADS_DIR} <backup place>).\n`);
}

main().catch((err: unknown) => {
  process.stderr.write(`Backup failed: ${(err as Error).message}\n`);
  process.exit(1);
});
