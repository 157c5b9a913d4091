import { existsSync } from 'node:fs';
import path from 'node:path';

/**
 * The project's folder (where package.json is), found above this file: the same from the sources
 * run by tsx and from the built server in `build/`, so migrations, mail templates and the web
 * export are found either way.
 */
export const projectRoot = ((): string => {
  for (let dir = __dirname; ; dir = path.dirname(dir)) {
    if (existsSync(path.join(dir, 'package.json'))) return dir;
    if (path.dirname(dir) === dir) throw new Error(`No package.json above ${__dirname}`);
  }
})();
