/**
 * The ship's side of the shore copy over SSH, as at sea: a local sshd (tests/helpers/sshd.ts)
 * stands for the shore machine. A ship server started with `REPLICATE_TO=sftp://…` sends its
 * record by Litestream's SFTP and its photos by rsync over ssh; on the far side, `litestream
 * restore` of the replica holds an entry logged through the API, and the photo's files are there
 * byte for byte.
 */
import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir, userInfo } from 'node:os';
import path from 'node:path';

import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { filesUnder, logEntry, restoredWith, startShip } from '../helpers/replica';
import type { ServerProcess } from '../helpers/server-process';
import { haveSshd, startSshd, type Sshd } from '../helpers/sshd';

describe.skipIf(!haveSshd)(
  `ship to a shore machine over SSH${haveSshd ? '' : ' (skipped: /usr/sbin/sshd is missing; .ci/run installs openssh-server)'}`,
  () => {
    const work = mkdtempSync(path.join(tmpdir(), 'bathynote-ssh-'));
    const shore = path.join(work, 'shore');
    let sshd: Sshd | undefined;
    let ship: ServerProcess | undefined;

    beforeAll(async () => {
      mkdirSync(shore, { recursive: true });
      sshd = await startSshd(path.join(work, 'keys'));
    }, 30_000);

    afterAll(async () => {
      await ship?.stop();
      if (ship) rmSync(ship.dir, { recursive: true, force: true });
      sshd?.stop();
      rmSync(work, { recursive: true, force: true });
    });

    it('sends the record by SFTP and the photos by rsync; the far side restores the entry', async () => {
      const link = sshd!;
      const user = encodeURIComponent(userInfo().username);
      ship = await startShip({
        REPLICATE_TO: `sftp://${user}@127.0.0.1:${link.port}${shore}`,
        REPLICATE_SSH_KEY: link.shipKey,
        REPLICATE_KNOWN_HOSTS: link.knownHosts,
        REPLICATE_PHOTOS_INTERVAL: '1',
      });
      const title = `Over the link ${Date.now()}`;
      const { photoId } = await logEntry(ship, title, true);

      const copy = await restoredWith(`file://${path.join(shore, 'db')}`, work, title, photoId, 30_000);
      const restored = new Database(copy, { readonly: true });
      expect(restored.pragma('integrity_check', { simple: true })).toBe('ok');
      const keysOf = restored
        .prepare('select original_key as o, display_key as d, thumb_key as t from photos where id = ?')
        .get(photoId) as {
        o: string;
        d: string;
        t: string;
      };
      restored.close();

      const deadline = Date.now() + 20_000;
      while (Date.now() < deadline && !filesUnder(path.join(shore, 'photos')).includes(keysOf.o))
        await new Promise((r) => setTimeout(r, 300));
      for (const key of [keysOf.t, keysOf.d, keysOf.o])
        expect(readFileSync(path.join(shore, 'photos', key)).equals(readFileSync(path.join(ship.dir, 'uploads', key)))).toBe(true);
      // Both went through this sshd: the ship's key was accepted for Litestream's SFTP and rsync's ssh.
      expect(link.log()).toMatch(/Accepted publickey/);
      // rsync's ssh recorded the shore's host key (ssh-keygen -F finds hashed entries too).
      const known = execFileSync('ssh-keygen', ['-F', `[127.0.0.1]:${link.port}`, '-f', link.knownHosts], { encoding: 'utf8' });
      expect(known).toContain(link.hostKeyPub.split(' ')[1]);
    }, 120_000);
  },
);
