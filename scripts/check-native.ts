// Run first by `npm start`: without better-sqlite3's compiled module (an install whose scripts
// were blocked, or a module built for another Node) the server cannot open its database, and the
// loader's own error is a long stack.
import { createRequire } from 'node:module';

import type DatabaseConstructor from 'better-sqlite3';

const require = createRequire(import.meta.url);
try {
  // Loaded here rather than imported, so that a missing module is caught and said in one line.
  const Database = require('better-sqlite3') as typeof DatabaseConstructor;
  new Database(':memory:').close();
} catch (err) {
  const why = String(err instanceof Error ? err.message : err).split('\n')[0];
  process.stderr.write(
    `Bathynote cannot start: the SQLite native module (better-sqlite3) is missing or unusable (${why}); run "npm rebuild better-sqlite3", which needs its install script allowed under "allowScripts" in package.json.\n`,
  );
  process.exit(1);
}
