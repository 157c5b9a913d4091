/**
 * The install is explicit: package.json names the dependencies allowed to run install scripts (npm
 * blocks the others), and `npm start` stops with one clear line when better-sqlite3's compiled
 * module is missing, as it is after an install that skipped its script.
 */
import { execFile } from 'node:child_process';
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';

import { afterAll, describe, expect, it } from 'vitest';

const run = promisify(execFile);
const root = path.join(__dirname, '../..');
const tsx = path.join(root, 'node_modules/tsx/dist/loader.mjs');
const dirs: string[] = [];
afterAll(() => {
  for (const dir of dirs) rmSync(dir, { recursive: true, force: true });
});

/** Runs a copy of scripts/check-native.ts in `dir`, so that it finds that folder's node_modules. */
async function checkNativeIn(dir: string): Promise<{ code: number; stderr: string }> {
  const script = path.join(dir, 'check-native.ts');
  cpSync(path.join(root, 'scripts/check-native.ts'), script);
  try {
    const { stderr } = await run(process.execPath, ['--import', tsx, script], { cwd: dir });
    return { code: 0, stderr };
  } catch (err) {
    const e = err as { code: number; stderr: string };
    return { code: e.code, stderr: e.stderr };
  }
}

describe('the install', () => {
  it('allows the install scripts the database and the bundler need, and runs the check before npm start', () => {
    const pkg = JSON.parse(readFileSync(path.join(root, 'package.json'), 'utf8')) as {
      allowScripts?: Record<string, boolean>;
      scripts: Record<string, string>;
    };
    expect(pkg.allowScripts).toMatchObject({ 'better-sqlite3': true, esbuild: true });
    expect(pkg.scripts.start).toMatch(/^node --import tsx scripts\/check-native\.ts && /);
  });

  it('passes with the module built', async () => {
    const { stderr } = await run(process.execPath, ['--import', tsx, path.join(root, 'scripts/check-native.ts')], { cwd: root });
    expect(stderr).toBe('');
  });

  it('says in one line what is wrong when the compiled module is missing', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'bathynote-native-'));
    dirs.push(dir);
    writeFileSync(path.join(dir, 'package.json'), '{"type": "module"}');
    // better-sqlite3 as an install whose script was skipped leaves it: its JavaScript, no build.
    for (const pkg of ['better-sqlite3', 'bindings', 'file-uri-to-path']) {
      cpSync(path.join(root, 'node_modules', pkg), path.join(dir, 'node_modules', pkg), {
        recursive: true,
        filter: (src) => !src.includes(`${path.sep}build`) && !src.includes(`${path.sep}deps`) && !src.includes(`${path.sep}src`),
      });
    }
    const { code, stderr } = await checkNativeIn(dir);
    expect(code).toBe(1);
    const lines = stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/^Bathynote cannot start: the SQLite native module \(better-sqlite3\) is missing/);
    expect(lines[0]).toContain('npm rebuild better-sqlite3');
  });
});
