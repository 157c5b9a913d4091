import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { brotliCompressSync, constants as zlibConstants, gzipSync } from 'node:zlib';

import express, { type Request, type RequestHandler, type Response } from 'express';

export type WebExport = {
  /** Hashes of the inline scripts of index.html, for the Content-Security-Policy. */
  scriptHashes: string[];
  handlers: RequestHandler[];
};

/** The encodings the build writes beside a file (`.br`, `.gz`), best first. */
const ENCODINGS = [
  { name: 'br', ext: '.br' },
  { name: 'gzip', ext: '.gz' },
] as const;

function isHashed(file: string): boolean {
  return file.includes(`${path.sep}_expo${path.sep}static${path.sep}`) || /\.[0-9a-f]{16,}\./.test(file);
}

/**
 * Headers that only a page (or a worker) acts on. A script, font or icon fetched by the page
 * ignores them, and on a satellite link their 800 bytes on each of a dozen files add up; the page
 * itself, the service worker and the API keep them all.
 */
const PAGE_ONLY_HEADERS = [
  'Content-Security-Policy',
  'Cross-Origin-Opener-Policy',
  'Origin-Agent-Cluster',
  'Referrer-Policy',
  'X-DNS-Prefetch-Control',
  'X-Download-Options',
  'X-Frame-Options',
  'X-Permitted-Cross-Domain-Policies',
  'X-XSS-Protection',
];

function cacheControl(res: Response, file: string): void {
  const hashed = isHashed(file);
  res.setHeader('Cache-Control', hashed ? 'public, max-age=31536000, immutable' : 'no-cache');
  // The service worker is a worker: its policy stays.
  if ((hashed && !file.endsWith('sw.js')) || /\.(ico|png)$/.test(file)) for (const name of PAGE_ONLY_HEADERS) res.removeHeader(name);
}

/** Every file of the export that has precompressed siblings, by its URL path. */
function precompressed(root: string): Map<string, Set<string>> {
  const found = new Map<string, Set<string>>();
  const walk = (dir: string) => {
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      const full = path.join(dir, entry.name);
      if (entry.isDirectory()) walk(full);
      else
        for (const { name, ext } of ENCODINGS) {
          if (!entry.name.endsWith(ext)) continue;
          const original = full.slice(0, -ext.length);
          if (!existsSync(original) || statSync(full).mtimeMs < statSync(original).mtimeMs) continue;
          const url = `/${path.relative(root, original).split(path.sep).join('/')}`;
          found.set(url, (found.get(url) ?? new Set()).add(name));
        }
    }
  };
  walk(root);
  return found;
}

/** The server's choice, best first, among what the browser accepts (browsers list gzip before br). */
function chosenEncoding(req: Request, available: ReadonlySet<string>): (typeof ENCODINGS)[number] | undefined {
  if (!req.headers['accept-encoding']) return undefined;
  return ENCODINGS.find((e) => available.has(e.name) && req.acceptsEncodings(e.name) === e.name);
}

/**
 * Serves the Expo web export: hashed bundles cached for a year, everything else revalidated,
 * and index.html for any other path so that deep links into the app survive a reload. Files
 * the build precompressed go as brotli or gzip to a browser that accepts it.
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

  const compressed = precompressed(root);
  const fromBuild: RequestHandler = (req, res, next) => {
    if (req.method !== 'GET' && req.method !== 'HEAD') return next();
    const available = compressed.get(req.path);
    if (!available) return next();
    res.vary('Accept-Encoding');
    const encoding = chosenEncoding(req, available);
    if (!encoding) return next();
    // The type of the original file; `send` keeps a Content-Type that is already set.
    res.type(path.extname(req.path));
    res.setHeader('Content-Encoding', encoding.name);
    cacheControl(res, req.path.split('/').join(path.sep));
    // A hashed file never changes under its name: no date to revalidate it with.
    const hashed = isHashed(req.path.split('/').join(path.sep));
    const options = { root, dotfiles: 'deny' as const, cacheControl: false, lastModified: !hashed };
    res.sendFile(`${req.path.slice(1)}${encoding.ext}`, options, (err?: Error) => {
      if (err && !res.headersSent) next(err);
    });
  };

  const statics = express.static(root, {
    index: false,
    fallthrough: true,
    setHeaders(res, file) {
      cacheControl(res, file);
    },
  });

  // index.html is small and goes on every cold start: kept ready in each encoding, each with
  // its own ETag so that a revalidation answers 304 without a body.
  const indexTag = createHash('sha256').update(index).digest('base64url').slice(0, 27);
  const indexBodies = {
    br: brotliCompressSync(index, { params: { [zlibConstants.BROTLI_PARAM_QUALITY]: 11 } }),
    gzip: gzipSync(index, { level: 9 }),
    identity: Buffer.from(index),
  };
  const indexEncodings = new Set(ENCODINGS.map((e) => e.name));
  const spa: RequestHandler = (req, res, next) => {
    if (req.method !== 'GET' && req.method !== 'HEAD') return next();
    const encoding = chosenEncoding(req, indexEncodings)?.name ?? 'identity';
    res.vary('Accept-Encoding');
    res.setHeader('Cache-Control', 'no-cache');
    res.setHeader('ETag', `"${indexTag}-${encoding}"`);
    if (encoding !== 'identity') res.setHeader('Content-Encoding', encoding);
    res.type('html').send(indexBodies[encoding]);
  };
  return { scriptHashes, handlers: [fromBuild, statics, spa] };
}
