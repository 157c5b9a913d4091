/**
 * What `npm start` runs once the bundles are built (as `build/start.cjs`). Without `REPLICATE_TO`
 * it loads the server in this same process, exactly as before; with it, this process supervises
 * Litestream, which runs the server (server/mirror/replicate-ship.ts).
 */
import path from 'node:path';

import { shipSettings } from '../server/mirror/replicate';
import { runShip } from '../server/mirror/replicate-ship';

// The bundles sit beside this file once built; run from the sources, they are in build/.
const buildDir = path.basename(__dirname) === 'build' ? __dirname : path.join(__dirname, '..', 'build');

try {
  const settings = shipSettings(process.env);
  if (settings) {
    runShip(settings, buildDir).catch((err: unknown) => {
      process.stderr.write(`Bathynote could not start: ${err instanceof Error ? err.message : String(err)}\n`);
      process.exit(1);
    });
  } else {
    require(path.join(buildDir, 'server.cjs'));
  }
} catch (err) {
  process.stderr.write(`Bathynote could not start: ${err instanceof Error ? err.message : String(err)}\n`);
  process.exit(1);
}
