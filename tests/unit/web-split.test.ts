import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import vm from 'node:vm';

import { afterEach, beforeEach, describe, expect, it } from 'vitest';

import { splitSharedChunk } from '../../scripts/web-build';

/**
 * A miniature of Expo's web export: Metro's runtime, a shared file every screen's modules come
 * from, the entry with Expo Router's route table, and four screens. Modules 200–204 are shared:
 * 200 (which needs 204) by the root layout, 201 by the sign-in screen, 202 by both signed-in
 * screens, 203 by the second one only.
 */
const web = '/_expo/static/js/web/';
const files: Record<string, string> = {
  '__expo-metro-runtime-aaaa1111.js': "var __METRO_GLOBAL_PREFIX__='';\n//# sourceMappingURL=x.map",
  '__common-dddd3333.js': [
    '__d(function(g,r,i,a,m,e,d){m.exports=200},200,[204]);',
    '__d(function(g,r,i,a,m,e,d){m.exports=201},201,[]);',
    '__d(function(g,r,i,a,m,e,d){m.exports=202},202,[]);',
    '__d(function(g,r,i,a,m,e,d){m.exports=203},203,[]);',
    '__d(function(g,r,i,a,m,e,d){m.exports=204},204,[]);',
  ].join('\n'),
  'entry-bbbb2222.js':
    '__d(function(g,r,i,a,m,e,d){const t=Object.defineProperties({},{' +
    '"./_layout.tsx":{enumerable:!0,get:()=>r(d[1])(d[0],d.paths)},' +
    '"./(auth)/sign-in.tsx":{enumerable:!0,get:()=>r(d[1])(d[2],d.paths)},' +
    '"./(app)/index.tsx":{enumerable:!0,get:()=>r(d[1])(d[3],d.paths)},' +
    '"./(app)/other.tsx":{enumerable:!0,get:()=>r(d[1])(d[4],d.paths)}})},20,' +
    `{"0":100,"1":21,"2":101,"3":102,"4":103,"paths":{"100":"${web}_layout-c0000001.js","101":"${web}sign-in-c0000002.js",` +
    `"102":"${web}index-c0000003.js","103":"${web}other-c0000004.js"}});\n__r(0);`,
  '_layout-c0000001.js': '__d(function(){},100,[200]);',
  'sign-in-c0000002.js': '__d(function(){},101,[201]);',
  'index-c0000003.js': '__d(function(){},102,[202,200]);',
  'other-c0000004.js': '__d(function(){},103,[202,203]);',
};
const scripts = ['__expo-metro-runtime-aaaa1111.js', '__common-dddd3333.js', 'entry-bbbb2222.js']
  .map((name) => `<script src="${web}${name}" defer></script>`)
  .join('');

let dir: string;
beforeEach(() => {
  dir = mkdtempSync(path.join(tmpdir(), 'bathynote-split-'));
  mkdirSync(path.join(dir, web), { recursive: true });
  for (const [name, text] of Object.entries(files)) writeFileSync(path.join(dir, web, name), text);
  writeFileSync(path.join(dir, 'index.html'), `<html><body><div id="root"></div>${scripts}</body></html>`);
});
afterEach(() => rmSync(dir, { recursive: true, force: true }));

const ids = (code: string) => [...code.matchAll(/\},(\d+),\[/g)].map((m) => Number(m[1]));

describe('splitting the shared file of the web export', () => {
  it('loads with the sign-in screen only the shared modules the signed-out screens use', () => {
    splitSharedChunk(dir);
    const names = readdirSync(path.join(dir, web));
    const html = readFileSync(path.join(dir, 'index.html'), 'utf8');
    const first = [...html.matchAll(/src="([^"]+)"/g)].map((m) => m[1]);
    expect(first).toHaveLength(1);
    expect(first[0]).toMatch(/\/entry-[0-9a-f]{32}\.js$/);
    expect(names).not.toContain('__common-dddd3333.js');
    expect(names).not.toContain('__expo-metro-runtime-aaaa1111.js');

    // Runtime first, then the shared modules the root layout and sign-in use, then the entry.
    const code = readFileSync(path.join(dir, first[0] ?? ''), 'utf8');
    expect(code.startsWith("var __METRO_GLOBAL_PREFIX__='';")).toBe(true);
    expect(code).not.toContain('sourceMappingURL');
    expect(ids(code).sort()).toEqual([200, 201, 204]);
    expect(code.trimEnd().endsWith('__r(0);')).toBe(true);

    const rest = names.filter((n) => n.startsWith('__common-rest-')).map((n) => ids(readFileSync(path.join(dir, web, n), 'utf8')));
    expect(rest.sort()).toEqual([[202], [203]]);
  });

  it('fetches with each screen the shared parts it needs, beside its own file', async () => {
    splitSharedChunk(dir);
    const html = readFileSync(path.join(dir, 'index.html'), 'utf8');
    const entry = /src="([^"]+)"/.exec(html)?.[1] ?? '';
    const loaderLine = readFileSync(path.join(dir, entry), 'utf8')
      .split('\n')
      .find((line) => line.startsWith('(function(g){'));
    expect(loaderLine).toBeDefined();
    // The page: Expo's loader is set on the global after the wrapper has run, then called per screen.
    const fetched: string[] = [];
    const page = vm.createContext({
      __METRO_GLOBAL_PREFIX__: '',
      fetchFile: (url: string) => {
        fetched.push(url);
        return Promise.resolve();
      },
    });
    vm.runInContext(loaderLine ?? '', page);
    vm.runInContext('globalThis.__loadBundleAsync = fetchFile', page);
    const load = async (name: string) => {
      fetched.length = 0;
      await (vm.runInContext(`__loadBundleAsync(${JSON.stringify(web + name)})`, page) as Promise<void>);
      return fetched.map((url) => ids(readFileSync(path.join(dir, url), 'utf8')));
    };
    expect(await load('_layout-c0000001.js')).toEqual([[100]]);
    expect(await load('sign-in-c0000002.js')).toEqual([[101]]);
    expect(await load('index-c0000003.js')).toEqual([[202], [102]]);
    expect(await load('other-c0000004.js')).toEqual([[202], [203], [103]]);
  });

  it('leaves an export it does not recognise as it was', () => {
    writeFileSync(path.join(dir, web, 'entry-bbbb2222.js'), '__d(function(){},1,[]);\n__r(1);');
    splitSharedChunk(dir);
    expect(readdirSync(path.join(dir, web))).toContain('__common-dddd3333.js');
    expect(readFileSync(path.join(dir, 'index.html'), 'utf8')).toContain(scripts);
  });
});
