/**
 * `npm test`: every test, in two lanes side by side.
 *
 * - browser: the browser tests, one file at a time (each starts a server and Chromium);
 * - record: the unit and API tests under `TZ=Pacific/Chatham`, then the unit tests and the API
 *   tests that deal in times again under `TZ=UTC` (`npm run test:utc`).
 *
 * Vitest runs one file at a time on a two-core machine (its default is one worker per core but
 * one), so a single run keeps a core idle while a browser test waits on its page; two lanes use
 * both. Each line of output says its lane. The exit code is the first failing lane's, else 0.
 */
import { spawn } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { createInterface } from 'node:readline';

import { chromiumPath, INSTALL_HINT } from '../tests/helpers/chromium';

type Step = { label: string; tz: string; args: string[] };
type Lane = { name: string; steps: Step[] };

const vitest = ['node_modules/vitest/vitest.mjs', 'run'];
const utcArgs = (): string[] => {
  // The same list as `npm run test:utc`, read from package.json so the two cannot drift apart.
  const pkg = JSON.parse(readFileSync(new URL('../package.json', import.meta.url), 'utf8')) as { scripts: Record<string, string> };
  const script = pkg.scripts['test:utc']!;
  return script
    .replace(/^TZ=UTC vitest run /, '')
    .match(/'[^']*'|\S+/g)!
    .map((a) => a.replace(/^'|'$/g, ''));
};

const lanes: Lane[] = [
  { name: 'browser', steps: [{ label: 'browser tests (Pacific/Chatham)', tz: 'Pacific/Chatham', args: ['--project', 'e2e'] }] },
  {
    name: 'record',
    steps: [
      { label: 'unit and API tests (Pacific/Chatham)', tz: 'Pacific/Chatham', args: ['--project', 'unit', '--project', 'api'] },
      { label: 'unit and API tests that deal in times (UTC)', tz: 'UTC', args: utcArgs() },
    ],
  },
];

const width = Math.max(...lanes.map((l) => l.name.length));

function runStep(lane: Lane, step: Step): Promise<number> {
  const prefix = `${lane.name.padEnd(width)} │ `;
  console.log(`${prefix}▶ ${step.label}`);
  const started = Date.now();
  const child = spawn(process.execPath, [...vitest, ...step.args], {
    env: Object.assign({}, process.env, { TZ: step.tz }),
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  for (const stream of [child.stdout, child.stderr]) {
    createInterface({ input: stream }).on('line', (line) => console.log(prefix + line));
  }
  return new Promise((resolve) => {
    child.on('close', (code, signal) => {
      const seconds = Math.round((Date.now() - started) / 1000);
      const status = code ?? (signal ? 1 : 0);
      console.log(
        `${prefix}${status === 0 ? '✔' : '✘'} ${step.label}: ${status === 0 ? 'passed' : `failed (exit ${status})`} in ${seconds} s`,
      );
      resolve(status);
    });
  });
}

async function runLane(lane: Lane): Promise<number> {
  for (const step of lane.steps) {
    const status = await runStep(lane, step);
    if (status !== 0) return status;
  }
  return 0;
}

async function main() {
  // Without Chromium the browser lane could only fail obscurely: say how to install it, once.
  if (!existsSync(chromiumPath())) {
    console.error(`${INSTALL_HINT} (looked for ${chromiumPath()})`);
    process.exit(1);
  }
  const started = Date.now();
  const results = await Promise.all(lanes.map(runLane));
  const minutes = ((Date.now() - started) / 60_000).toFixed(1);
  const failed = lanes.filter((_, i) => results[i] !== 0).map((l) => l.name);
  console.log(failed.length === 0 ? `Every test passed (${minutes} min).` : `Failed: ${failed.join(', ')} (${minutes} min).`);
  process.exit(results.find((r) => r !== 0) ?? 0);
}

void main();
