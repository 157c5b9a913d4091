import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';

import express, { type RequestHandler } from 'express';

export type WebExport = {
  /** Hashes of the inline scripts of index.html, for the Content-Security-Policy. */
  scriptHashes: string[];
  handlers: RequestHandler[];
};

/**
 * Serves the Expo web export: hashed bundles cached for a year, everything else revalidated,
 * and index.html for any other path so that deep links into the app survive a reload.
 */
export function webExport(dir: string): WebExport {
  const root = path.resolve(dir);
  const indexFile = path.join(root, 'index.html');
  if (!existsSync(indexFile)) {
    const missing: RequestHandler = (_req, res) => {
      res.status(503).type('text/plain').send('The web app has not been built. Run `npm start` (it builds it) or `npm run build:web`.');
    };
    return { scriptHashes: [], handlers: [missing] };
  }
  const index = readFileSync(indexFile, 'utf8');
  const scriptHashes = [...index.matchAll(/<script(?![^>]*\bsrc=)[^>]*>([\s\S]*?)<\/script>/g)]
    .map((m) => m[1] ?? '')
    .filter((body) => body.length > 0)
    .map((body) => `'sha256-${createHash('sha256').update(body).digest('base64')}'`);

  const statics = express.static(root, {
    index: false,
    fallthrough: true,
    setHeaders(res, file) {
      const hashed = file.includes(`${path.sep}_expo${path.sep}static${path.sep}`) || /\.[0-9a-f]{16,}\./.test(file);
      res.setHeader('Cache-Control', hashed ? 'public, max-age=31536000, immutable' : 'no-cache');
    },
  });
  const spa: RequestHandler = (req, res, next) => {
    if (req.method !== 'GET' && req.method !== 'HEAD') return next();
    res.setHeader('Cache-Control', 'no-cache');
    res.type('html').send(index);
  };
  return { scriptHashes, handlers: [statics, spa] };
}
