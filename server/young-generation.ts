/**
 * Holds V8's young generation at its starting size while the server starts. V8 doubles it (up to
 * 16 MB a half) whenever a burst of allocation survives, and loading the modules and opening the
 * database is such a burst; it never gives those pages back, so the idle server sat at about
 * twice its live heap. Once started, the young generation may grow again: a long telemetry import
 * in a small one promotes its short-lived strings to the old generation, which then grows by
 * hundreds of megabytes before a full collection.
 *
 * Imported first by `index.ts`, before anything allocates. The growth factor, unlike
 * --max-semi-space-size, takes effect when set at run time.
 */
import { setFlagsFromString } from 'node:v8';

setFlagsFromString('--semi-space-growth-factor=1');

/** V8's own growth factor again, once the server has started. */
export function letYoungGenerationGrow(): void {
  setFlagsFromString('--semi-space-growth-factor=2');
}
