/**
 * Builds the web export into dist/ when it is missing or older than its sources. A fingerprint
 * of every input file is kept beside the export, so an unchanged tree starts at once.
 */
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { brotliCompressSync, constants as zlibConstants, gzipSync } from 'node:zlib';

import { generateSW } from 'workbox-build';

const root = path.resolve(__dirname, '..');
// WEB_DIR lets two checkouts or two test runs build side by side; the server reads the same variable.
const webDir: unknown = process.env.WEB_DIR;
const outDir = path.resolve(root, typeof webDir === 'string' && webDir ? webDir : 'dist');
const stampFile = path.join(outDir, '.bathynote-build');
const inputs = [
  'app',
  'components',
  'hooks',
  'lib',
  'assets',
  'public',
  'app.json',
  'package-lock.json',
  'tsconfig.json',
  'babel.config.js',
  'metro.config.js',
  'metro',
  // This file writes the service worker: a change to it is a change to the export.
  'scripts/web-build.ts',
];

function* files(p: string): Generator<string> {
  if (!existsSync(p)) return;
  if (statSync(p).isFile()) {
    yield p;
    return;
  }
  for (const entry of readdirSync(p).sort()) yield* files(path.join(p, entry));
}

export function sourceFingerprint(): string {
  const hash = createHash('sha256');
  for (const input of inputs) {
    for (const file of files(path.join(root, input))) {
      hash.update(path.relative(root, file));
      hash.update(readFileSync(file));
    }
  }
  return hash.digest('hex');
}

export function webBuildIsCurrent(): boolean {
  return (
    existsSync(path.join(outDir, 'index.html')) &&
    existsSync(path.join(outDir, 'sw.js')) &&
    existsSync(stampFile) &&
    readFileSync(stampFile, 'utf8').trim() === sourceFingerprint()
  );
}

// Text-like files worth compressing; images are already compressed and source maps never go to a browser.
const COMPRESSIBLE = /\.(js|mjs|css|html|json|svg|txt|xml|ttf|otf|ico|wasm)$/;

/**
 * Writes brotli (`.br`, best quality) and gzip (`.gz`, level 9) beside every compressible file of
 * the export, once, for the server to send as they are; a copy that would not be smaller is not
 * written. Copies newer than their file are kept, so an unchanged export is not compressed again.
 */
export function precompressWebBuild(dir = outDir): void {
  for (const file of files(dir)) {
    if (!COMPRESSIBLE.test(file)) continue;
    const stat = statSync(file);
    if (stat.size < 256) continue;
    let body: Buffer | undefined;
    for (const [ext, compress] of [
      [
        '.br',
        (b: Buffer) =>
          brotliCompressSync(b, { params: { [zlibConstants.BROTLI_PARAM_QUALITY]: 11, [zlibConstants.BROTLI_PARAM_SIZE_HINT]: b.length } }),
      ],
      ['.gz', (b: Buffer) => gzipSync(b, { level: 9 })],
    ] as const) {
      const target = file + ext;
      if (existsSync(target) && statSync(target).mtimeMs >= stat.mtimeMs) continue;
      body ??= readFileSync(file);
      const packed = compress(body);
      if (packed.length < body.length) writeFileSync(target, packed);
    }
  }
}

/**
 * Writes the service worker (`sw.js`, Workbox) into the export: it keeps the app shell (index.html),
 * every screen's script and the fonts, so that the app opens and every screen works with no link
 * at all (an entry written offline needs the entry form's script). The app registers it only once
 * someone is signed in, so the cold sign-in screen moves nothing for it; the scripts the page has
 * already loaded come from the browser's cache, the rest (about 90 KB compressed) follow behind
 * the dive log. Hashed files are fetched once and never again; any other path of the site opens
 * index.html, as the server does.
 * API answers are not its business: the app keeps the last ones it saw itself.
 */
export async function writeServiceWorker(dir = outDir): Promise<void> {
  const { count, size, warnings } = await generateSW({
    globDirectory: dir,
    globPatterns: ['index.html', '_expo/static/js/web/*.js', 'assets/**/*.woff2', 'favicon.ico'],
    swDest: path.join(dir, 'sw.js'),
    // The file names already change with their content: no cache-busting query, so a file the
    // page already has comes from the browser's cache instead of crossing the link again.
    dontCacheBustURLsMatching: /(^_expo\/static\/|\.[0-9a-f]{16,}\.)/,
    maximumFileSizeToCacheInBytes: 8 * 1024 * 1024,
    navigateFallback: '/index.html',
    navigateFallbackDenylist: [/^\/api\//],
    runtimeCaching: [
      {
        urlPattern: ({ url }) => url.pathname.startsWith('/_expo/static/') || url.pathname.startsWith('/assets/'),
        handler: 'CacheFirst',
        options: { cacheName: 'bathynote-files', expiration: { maxEntries: 200 } },
      },
    ],
    inlineWorkboxRuntime: true,
    clientsClaim: true,
    skipWaiting: true,
    cleanupOutdatedCaches: true,
    sourcemap: false,
    mode: 'production',
  });
  for (const w of warnings) process.stderr.write(`service worker: ${w}\n`);
  process.stdout.write(`Service worker keeps ${count} files (${Math.round(size / 1024)} KB).\n`);
}

export async function ensureWebBuild(): Promise<void> {
  if (webBuildIsCurrent()) {
    precompressWebBuild();
    return;
  }
  process.stdout.write('Building the web app (dist/); a cold build takes about two minutes…\n');
  const started = Date.now();
  const result = spawnSync('npx', ['expo', 'export', '--platform', 'web', '--output-dir', outDir], {
    cwd: root,
    stdio: ['ignore', 'inherit', 'inherit'],
    env: { ...process.env, CI: '1', EXPO_NO_TELEMETRY: '1' },
  });
  if (result.status !== 0) throw new Error(`The web build failed (exit code ${result.status ?? result.signal}).`);
  await writeServiceWorker();
  precompressWebBuild();
  writeFileSync(stampFile, sourceFingerprint());
  process.stdout.write(`Web app built in ${Math.round((Date.now() - started) / 1000)} s.\n`);
}

if (require.main === module) {
  ensureWebBuild().catch((err: unknown) => {
    process.stderr.write(`${(err as Error).message}\n`);
    process.exit(1);
  });
}
