/**
 * Keeps V8's young generation at its starting size. V8 doubles it (up to 16 MB a half) whenever
 * a burst of allocation survives, at start or in an import, and never gives the pages back: the
 * server sat at about twice its live heap when idle. A young generation that stays small costs a
 * few more short collections under load. Imported first by `index.ts`, before anything allocates;
 * the flag takes effect at run time, unlike --max-semi-space-size, which only the command line sets.
 */
import { setFlagsFromString } from 'node:v8';

setFlagsFromString('--semi-space-growth-factor=1');
