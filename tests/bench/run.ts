/**
 * `npm run bench`: the speed and memory figures. Each benchmark prints its numbers; none of
 * them asserts a time (machines differ), the targets are printed beside the figures.
 */
import { benchDigest } from './digest';
import { benchExports } from './exports';
import { benchIdleMemory } from './idle-memory';
import { benchLiveLoad } from './live-load';
import { benchLogWrites } from './log-writes';
import { benchPhotoLoad } from './photo-load';
import { benchSearch } from './search';
import { benchShore } from './shore';
import { benchTelemetryImport } from './telemetry-import';
import { benchThinLink } from './thin-link';

async function main() {
  const only = process.argv[2];
  const benches: [string, () => Promise<void>][] = [
    ['idle-memory', benchIdleMemory],
    ['log-writes', benchLogWrites],
    ['live-load', benchLiveLoad],
    ['telemetry-import', benchTelemetryImport],
    ['exports', benchExports],
    ['search', benchSearch],
    ['digest', benchDigest],
    ['photo-load', benchPhotoLoad],
    ['thin-link', benchThinLink],
    ['shore', benchShore],
  ];
  for (const [name, run] of benches) {
    if (only && only !== name) continue;
    process.stdout.write(`\n== ${name} ==\n`);
    await run();
  }
}

main().catch((err: unknown) => {
  process.stderr.write(`${(err as Error).stack ?? String(err)}\n`);
  process.exit(1);
});
