/**
 * Builds the web export into dist/ when it is missing or older than its sources. A fingerprint
 * of every input file is kept beside the export, so an unchanged tree starts at once.
 */
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, renameSync, statSync, unlinkSync, writeFileSync } from 'node:fs';
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

/**
 * What a signed-out visit loads: Expo Router reads every layout file as it starts, then the sign-in
 * screen. What these use is all the cold sign-in screen should move.
 */
const SIGNED_OUT_SCREEN = './(auth)/sign-in.tsx';

/** The screens from signing in to a dive's log: the shared code they use comes first, on its own. */
const FIRST_SIGNED_IN_SCREENS = ['./(app)/index.tsx', './(app)/campaigns/[campaignId]/index.tsx', './(app)/dives/[diveId]/index.tsx'];

type MetroModule = { id: number; deps: number[]; lazy: string[]; code: string };

/** The modules of one Metro web chunk: one `__d(factory, id, deps)` call each, at the start of a line. */
function metroModules(code: string): MetroModule[] | undefined {
  const modules: MetroModule[] = [];
  let current: string[] | undefined;
  const finish = (): boolean => {
    if (!current) return true;
    const text = current.join('\n');
    const tail = /,(\d+),(\[[\d,]*\]|\{.*\})\);$/s.exec(text);
    if (!tail) return false;
    const deps = JSON.parse(tail[2] ?? '[]') as number[] | Record<string, unknown>;
    const ids = Array.isArray(deps) ? deps : Object.entries(deps).flatMap(([k, v]) => (k === 'paths' ? [] : [v as number]));
    const lazy = Array.isArray(deps) ? [] : Object.values((deps.paths ?? {}) as Record<string, string>);
    modules.push({ id: Number(tail[1]), deps: ids, lazy, code: text });
    return true;
  };
  for (const line of code.split('\n')) {
    if (line.startsWith('//# ') || line === '') {
      if (!finish()) return undefined;
      current = undefined;
    } else if (line.startsWith('__d(')) {
      if (!finish()) return undefined;
      current = [line];
    } else if (current) current.push(line);
    else return undefined;
  }
  return finish() ? modules : undefined;
}

const contentHash = (text: string) => createHash('md5').update(text).digest('hex');

/**
 * Expo's web export loads one shared file (`__common`) before any screen: every module that two
 * screens share, so the sign-in screen would pay for everything the signed-in screens share. This
 * splits it in two: what the signed-out screens use stays in the file index.html loads; the rest
 * goes to a second file that the loader fetches, in parallel, with the first signed-in screen's
 * own file. A module Metro defines twice keeps its first definition, so the split cannot change
 * what runs. If the export is not in the shape expected, it is left as it was.
 */
export function splitSharedChunk(dir = outDir): void {
  const jsDir = path.join(dir, '_expo', 'static', 'js', 'web');
  const indexFile = path.join(dir, 'index.html');
  const html = readFileSync(indexFile, 'utf8');
  const names = readdirSync(jsDir);
  const commonName = names.find((n) => /^__common-[0-9a-f]+\.js$/.test(n) && html.includes(`/${n}"`));
  const entryName = names.find((n) => /^entry-[0-9a-f]+\.js$/.test(n) && html.includes(`/${n}"`));
  const skip = (why: string): void => {
    process.stdout.write(`The shared file is left whole: ${why}.\n`);
  };
  if (!commonName || !entryName) return skip('no shared file in index.html');
  const common = metroModules(readFileSync(path.join(jsDir, commonName), 'utf8'));
  if (!common) return skip('its modules could not be read');

  // The route table of Expo Router: route file → module id (via the deps object) → chunk URL.
  const table = readFileSync(path.join(jsDir, entryName), 'utf8')
    .split('\n')
    .find((line) => line.includes(`"${SIGNED_OUT_SCREEN}":`));
  const depsObject = table && /,\d+,(\{"0":.*\})\);$/.exec(table);
  if (!table || !depsObject) return skip('no route table in the entry file');
  const deps = JSON.parse(depsObject[1] ?? '{}') as Record<string, number> & { paths: Record<string, string> };
  const routeUrl = (route: string): string | undefined => {
    const at = new RegExp(
      `"${route.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&')}":\\{enumerable:!0,get:\\(\\)=>r\\(d\\[\\d+\\]\\)\\(d\\[(\\d+)\\]`,
    ).exec(table);
    return at ? deps.paths[String(deps[at[1] ?? ''])] : undefined;
  };
  const layouts = [...table.matchAll(/"(\.\/(?:[^"]*\/)?_layout\.tsx)":/g)].map((m) => m[1] ?? '');
  const ownUrls: string[] = [];
  for (const route of [...layouts, SIGNED_OUT_SCREEN]) {
    const url = routeUrl(route);
    if (!url) return skip(`no file for ${route}`);
    ownUrls.push(url);
  }

  // Every screen's own file, and the closure of shared modules it needs.
  const chunks = new Map<string, MetroModule[]>();
  for (const name of names) {
    if (!name.endsWith('.js') || name === commonName || name === entryName || name.startsWith('__expo-metro-runtime-')) continue;
    const modules = metroModules(readFileSync(path.join(jsDir, name), 'utf8'));
    if (!modules) return skip(`${name} could not be read`);
    chunks.set(`/_expo/static/js/web/${name}`, modules);
  }
  const byId = new Map(common.map((m) => [m.id, m]));
  const closure = (urls: string[]): Set<number> => {
    const found = new Set<number>();
    const visit = (ids: number[]) => {
      for (const id of ids) {
        const m = byId.get(id);
        if (!m || found.has(id)) continue;
        found.add(id);
        visit(m.deps);
      }
    };
    for (const url of urls) visit((chunks.get(url) ?? []).flatMap((m) => m.deps));
    return found;
  };
  if (ownUrls.some((url) => !chunks.has(url))) return skip('a signed-out screen has no file');
  const needed = closure(ownUrls);
  const rest = common.filter((m) => !needed.has(m.id));
  if (rest.length === 0) return skip('the signed-out screens use all of it');

  // What the first signed-in screens use (with what the layouts load later: the signed-in frame, the
  // font files) comes in one file; what only the other screens share, in another.
  const firstUrls = FIRST_SIGNED_IN_SCREENS.map(routeUrl).filter((u): u is string => !!u);
  for (const url of ownUrls) firstUrls.push(...(chunks.get(url) ?? []).flatMap((m) => m.lazy));
  const first = closure(firstUrls);
  const parts = [rest.filter((m) => first.has(m.id)), rest.filter((m) => !first.has(m.id))].filter((p) => p.length > 0);
  const partUrls: string[] = [];
  for (const part of parts) {
    const code = `${part.map((m) => m.code).join('\n')}\n`;
    partUrls.push(`/_expo/static/js/web/__common-rest-${contentHash(code)}.js`);
  }
  // The files that need no shared part (the signed-out screens, the parts themselves) and those that
  // need the second part, by the first eight digits of their hash; every other file needs the first.
  const tag = (url: string) => /-([0-9a-f]{8})[0-9a-f]*\.js$/.exec(url)?.[1] ?? url;
  const tags = [...chunks.keys(), ...partUrls].map(tag);
  if (new Set(tags).size !== tags.length) return skip('two files share a hash prefix');
  const alone = [...ownUrls, ...partUrls].map(tag);
  const second =
    parts.length > 1
      ? [...chunks.keys()].filter((url) => !ownUrls.includes(url) && (parts[1] ?? []).some((m) => closure([url]).has(m.id))).map(tag)
      : [];

  // Expo's loader is looked up on globalThis at each dynamic import; this wraps it as it is set, so
  // that a screen's file and the shared parts it needs are fetched side by side.
  const loader =
    `(function(g){var k=(g.__METRO_GLOBAL_PREFIX__||"")+"__loadBundleAsync",load,parts=${JSON.stringify(partUrls)},` +
    `alone=${JSON.stringify(alone.join(' '))},second=${JSON.stringify(second.join(' '))};` +
    `Object.defineProperty(g,k,{configurable:!0,set:function(f){load=f},get:function(){return load&&function(p){` +
    `var t=(/-([0-9a-f]{8})[0-9a-f]*\\.js$/.exec(p)||[])[1]||p,n=alone.indexOf(t)>=0?[]:second.indexOf(t)>=0?parts:parts.slice(0,1);` +
    `return Promise.all(n.map(function(u){return load(u)}).concat([load(p)])).then(function(){})}}})})(globalThis);`;
  // The page's first scripts run in order (Metro's runtime, the shared modules, the entry); as one
  // file they cross the link as one answer, compressed together.
  const runtimeName = names.find((n) => /^__expo-metro-runtime-[0-9a-f]+\.js$/.test(n) && html.includes(`/${n}"`));
  const script = (name: string) => `<script src="/_expo/static/js/web/${name}" defer></script>`;
  if (!runtimeName || !html.includes(script(runtimeName) + script(commonName) + script(entryName)))
    return skip('index.html loads other scripts than expected');
  const withoutMaps = (name: string) =>
    readFileSync(path.join(jsDir, name), 'utf8')
      .split('\n')
      .filter((line) => !line.startsWith('//# '))
      .join('\n');
  const eagerModules = common.filter((m) => needed.has(m.id)).map((m) => m.code);
  const firstCode = [withoutMaps(runtimeName), loader, ...eagerModules, withoutMaps(entryName)].join('\n');
  const firstName = `entry-${contentHash(firstCode)}.js`;
  for (const [index, part] of parts.entries())
    writeFileSync(path.join(dir, partUrls[index] ?? ''), `${part.map((m) => m.code).join('\n')}\n`);
  writeFileSync(path.join(jsDir, firstName), firstCode);
  for (const name of [runtimeName, commonName, entryName])
    for (const stale of [name, `${name}.map`, `${name}.br`, `${name}.gz`])
      if (existsSync(path.join(jsDir, stale))) unlinkSync(path.join(jsDir, stale));
  const updated = html.replace(script(runtimeName) + script(commonName) + script(entryName), script(firstName));
  writeFileSync(`${indexFile}.tmp`, updated);
  renameSync(`${indexFile}.tmp`, indexFile);
  process.stdout.write(
    `Shared file split: ${needed.size} modules (${Math.round(eagerModules.join('').length / 1024)} KB) for the signed-out screens, then ` +
      parts.map((part) => `${part.length} (${Math.round(part.reduce((n, m) => n + m.code.length, 0) / 1024)} KB)`).join(' and ') +
      ' after sign-in.\n',
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
  splitSharedChunk();
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
