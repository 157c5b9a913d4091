/** `npm run db:restore -- <backup file>`: with the server stopped, put a backup in place. */
import { restoreDatabase } from '../db/backup';
import { loadEnv } from '../server/env';

const backup = process.argv[2];
if (!backup) {
  process.stderr.write('Usage: npm run db:restore -- <backup file>   (stop the server first)\n');
  process.exit(2);
}
try {
  const env = loadEnv();
  const { keptAs } = restoreDatabase(backup, env.DATABASE_PATH);
  process.stdout.write(`Restored ${backup} to ${env.DATABASE_PATH}.${keptAs ? ` The database it replaced is kept as ${keptAs}.` : ''}\n`);
} catch (err) {
  process.stderr.write(`Restore failed: ${(err as Error).message}\n`);
  process.exit(1);
}
