import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';

import { buildServer } from '../../scripts/build-server';

const root = path.resolve(__dirname, '..', '..');

let bundle: string | undefined;

export type ServerProcess = { url: string; dir: string; child: ChildProcess; output: () => string; stop: () => Promise<void> };

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const address = s.address();
      const port = typeof address === 'object' && address ? address.port : 0;
      s.close(() => resolve(port));
    });
  });
}

/**
 * The real server as `npm start` runs it (the bundle of `server/index.ts`, built once per test
 * process from the current sources), on a free port with a fresh database; or another entry
 * script through tsx, or an existing data folder (to restart on the same database).
 */
export async function startServerProcess(
  env: Record<string, string> = {},
  options: {
    script?: string;
    dir?: string;
    keepDir?: boolean;
    /** Pin the server to these CPUs (`taskset -c`), where taskset exists. */ cpus?: string;
  } = {},
): Promise<ServerProcess> {
  const dir = options.dir ?? mkdtempSync(path.join(tmpdir(), 'bathynote-e2e-'));
  const port = await freePort();
  const url = `http://127.0.0.1:${port}`;
  let log = '';
  const entry = options.script ? ['--import', 'tsx', options.script] : [(bundle ??= buildServer())];
  const args = [
    ...(process.env.BENCH_PROFILE_DIR ? ['--cpu-prof', '--cpu-prof-dir', process.env.BENCH_PROFILE_DIR] : []),
    // Node and V8 flags for the server alone, to try one on a benchmark (e.g. --trace-gc).
    ...(process.env.BENCH_SERVER_FLAGS?.split(/\s+/).filter(Boolean) ?? []),
    ...entry,
  ];
  // taskset runs the server in its own place (exec), so the child's pid is the server's.
  const child = spawn(options.cpus ? 'taskset' : process.execPath, options.cpus ? ['-c', options.cpus, process.execPath, ...args] : args, {
    cwd: root,
    env: {
      ...process.env,
      NODE_ENV: 'production',
      PORT: String(port),
      HOST: '127.0.0.1',
      DATABASE_PATH: path.join(dir, 'bathynote.db'),
      UPLOADS_DIR: path.join(dir, 'uploads'),
      BATHYNOTE_DEMO: '1',
      // The demo's simulated dive under way writes on its own; a test that wants it asks for it.
      BATHYNOTE_DEMO_LIVE: '0',
      // Nor does the demo's watch plan write handover notes at a real change of watch mid-test.
      BATHYNOTE_DEMO_WATCHES: '0',
      LOG_LEVEL: 'error',
      // As npm start sets it: two malloc arenas, not one per thread that ever decoded a photo.
      MALLOC_ARENA_MAX: '2',
      ...env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout?.on('data', (d: Buffer) => (log += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (log += d.toString()));
  const deadline = Date.now() + 60_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`server exited early:\n${log}`);
    try {
      const res = await fetch(`${url}/api/health`);
      if (res.ok) break;
    } catch {
      // Not listening yet.
    }
    if (Date.now() > deadline) throw new Error(`server did not start in 60 s:\n${log}`);
    await new Promise((r) => setTimeout(r, 200));
  }
  return {
    url,
    dir,
    child,
    output: () => log,
    stop: async () => {
      if (child.exitCode === null) {
        const exited = new Promise((r) => child.once('exit', r));
        child.kill('SIGTERM');
        await exited;
      }
      if (!options.keepDir) rmSync(dir, { recursive: true, force: true });
    },
  };
}
