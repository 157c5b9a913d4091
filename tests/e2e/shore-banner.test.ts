/**
 * A shore mirror's screens say that they show the shore copy and how far behind the ship it is,
 * and say so when the link is down; the ship's screens say nothing of the kind.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { litestreamBinary } from '@/server/mirror/replicate';
import { openBrowser, viewports } from '../helpers/chromium';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

const work = mkdtempSync(path.join(tmpdir(), 'bathynote-shore-banner-'));
const replica = path.join(work, 'replica');
const secrets = { AUTH_SECRET: 'shore-banner-secret-shore-banner-secret-01', MIRROR_KEY: 'shore-banner-mirror-key-01' };

let ship: ServerProcess;
let shore: ServerProcess;
let litestream: ChildProcess;

beforeAll(async () => {
  ship = await startServerProcess(secrets);
  litestream = spawn(litestreamBinary(), ['replicate', path.join(ship.dir, 'bathynote.db'), `file://${path.join(replica, 'db')}`], {
    stdio: 'ignore',
  });
  const deadline = Date.now() + 20_000;
  while (!existsSync(path.join(replica, 'db', 'generations')) && Date.now() < deadline) await new Promise((r) => setTimeout(r, 100));
  shore = await startServerProcess({ ...secrets, MIRROR_OF: ship.url, REPLICA: replica, MIRROR_RESTORE_INTERVAL_MS: '2000' });
}, 120_000);

afterAll(async () => {
  if (litestream.exitCode === null) litestream.kill('SIGTERM');
  await shore?.stop();
  await ship?.stop();
  rmSync(work, { recursive: true, force: true });
});

describe('shore banner', () => {
  it('shows the shore copy and its lag on the mirror, nothing on the ship, and a link that went down', async () => {
    const screen = await openBrowser(viewports.phone);
    try {
      const page = screen.page;
      // The ship answers its health without a mirror, and the banner stays away.
      const shipHealth = page.waitForResponse((r) => r.url().endsWith('/api/health'));
      await page.goto(ship.url);
      await page.getByTestId('sign-in-email').waitFor();
      expect(await (await shipHealth).json()).not.toHaveProperty('mirror');
      expect(await page.getByTestId('shore-banner').count()).toBe(0);

      await page.goto(shore.url);
      const banner = page.getByTestId('shore-banner');
      await banner.waitFor();
      expect(await banner.innerText()).toMatch(/^shore copy, \d+ s behind the ship$/);

      litestream.kill('SIGTERM');
      ship.child.kill('SIGTERM');
      await page.getByText(/link to the ship down/).waitFor({ timeout: 30_000 });
      expect(screen.errors).toEqual([]);
    } finally {
      await screen.close();
    }
  }, 120_000);
});
