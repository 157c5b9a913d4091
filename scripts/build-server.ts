/**
 * Bundles the server's own sources (server/, db/, lib/) into build/server.cjs for `npm start`,
 * with every package left to node_modules, and beside it build/prepare-database.cjs, which the
 * server runs in a child process to migrate and seed (so the server's bundle holds no seed).
 * Running the bundle with plain Node starts faster and holds about 40 MB less than compiling
 * TypeScript at run time with tsx. It takes a fraction of a second, so it is rebuilt on every
 * start; written to a temporary file and renamed, so two runs at once never see half a bundle.
 */
import { renameSync } from 'node:fs';
import path from 'node:path';

import { buildSync } from 'esbuild';

const root = path.resolve(__dirname, '..');
export const SERVER_BUNDLE = path.join(root, 'build', 'server.cjs');

/** Entry points and the bundle each becomes; the server's is renamed into place last. */
const ENTRIES: [string, string][] = [
  [path.join(root, 'server', 'prepare-database.ts'), path.join(root, 'build', 'prepare-database.cjs')],
  // What npm start runs: the server itself, or Litestream running it when the record is replicated.
  [path.join(root, 'scripts', 'start.ts'), path.join(root, 'build', 'start.cjs')],
  [path.join(root, 'server', 'index.ts'), SERVER_BUNDLE],
];

export function buildServer(): string {
  for (const [entry, bundle] of ENTRIES) buildOne(entry, bundle);
  return SERVER_BUNDLE;
}

function buildOne(entry: string, bundle: string): void {
  const temp = `${bundle}.${process.pid}.tmp`;
  buildSync({
    entryPoints: [entry],
    outfile: temp,
    bundle: true,
    platform: 'node',
    format: 'cjs',
    target: 'node20',
    packages: 'external',
    // Not minified, so a logged stack still names the functions; a source map would cost ~30 MB held.
    minify: false,
    tsconfig: path.join(root, 'tsconfig.json'),
    logLevel: 'warning',
  });
  renameSync(temp, bundle);
}

if (require.main === module) buildServer();
