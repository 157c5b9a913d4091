/**
 * The ship's side of the shore copy over SSH, as at sea: a local sshd (Debian's OpenSSH server,
 * with its own host key, configuration and authorized key in a temporary folder, on a free port,
 * as the current user) stands for the shore machine. A ship server started with
 * `REPLICATE_TO=sftp://…` sends its record by Litestream's SFTP and its photos by rsync over ssh;
 * on the far side, `litestream restore` of the replica holds an entry logged through the API, and
 * the photo's files are there byte for byte.
 */
import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { userInfo, tmpdir } from 'node:os';
import path from 'node:path';

import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { filesUnder, logEntry, restoredWith, startShip } from '../helpers/replica';
import { freePort, type ServerProcess } from '../helpers/server-process';

const SSHD = '/usr/sbin/sshd';
const haveSshd = existsSync(SSHD);

describe.skipIf(!haveSshd)(
  `ship to a shore machine over SSH${haveSshd ? '' : ' (skipped: /usr/sbin/sshd is missing; .ci/run installs openssh-server)'}`,
  () => {
    const work = mkdtempSync(path.join(tmpdir(), 'bathynote-ssh-'));
    const keys = path.join(work, 'keys');
    const shore = path.join(work, 'shore');
    let sshd: ChildProcess | undefined;
    let sshdLog = '';
    let port = 0;
    let ship: ServerProcess | undefined;

    beforeAll(async () => {
      mkdirSync(keys, { recursive: true });
      mkdirSync(shore, { recursive: true });
      execFileSync('ssh-keygen', ['-q', '-t', 'ed25519', '-N', '', '-f', path.join(keys, 'host_key')]);
      execFileSync('ssh-keygen', ['-q', '-t', 'ed25519', '-N', '', '-f', path.join(keys, 'ship_key')]);
      writeFileSync(path.join(keys, 'authorized_keys'), readFileSync(path.join(keys, 'ship_key.pub')));
      // As root, sshd wants its privilege-separation folder; as anyone else it runs without one.
      if (process.getuid?.() === 0) mkdirSync('/run/sshd', { recursive: true });
      port = await freePort();
      writeFileSync(
        path.join(keys, 'sshd_config'),
        [
          `Port ${port}`,
          'ListenAddress 127.0.0.1',
          `HostKey ${path.join(keys, 'host_key')}`,
          `AuthorizedKeysFile ${path.join(keys, 'authorized_keys')}`,
          `PidFile ${path.join(keys, 'sshd.pid')}`,
          // The temporary folder's modes are the test's, not a home directory's.
          'StrictModes no',
          'UsePAM no',
          'PasswordAuthentication no',
          'KbdInteractiveAuthentication no',
          'PubkeyAuthentication yes',
          'PermitRootLogin prohibit-password',
          'Subsystem sftp internal-sftp',
          '',
        ].join('\n'),
      );
      sshd = spawn(SSHD, ['-D', '-e', '-f', path.join(keys, 'sshd_config')], { stdio: ['ignore', 'ignore', 'pipe'] });
      sshd.stderr?.on('data', (d: Buffer) => (sshdLog += d.toString()));
      const deadline = Date.now() + 10_000;
      while (!sshdLog.includes('Server listening')) {
        if (sshd.exitCode !== null || Date.now() > deadline) throw new Error(`sshd did not start:\n${sshdLog}`);
        await new Promise((r) => setTimeout(r, 100));
      }
    }, 30_000);

    afterAll(async () => {
      await ship?.stop();
      if (ship) rmSync(ship.dir, { recursive: true, force: true });
      sshd?.kill('SIGTERM');
      rmSync(work, { recursive: true, force: true });
    });

    it('sends the record by SFTP and the photos by rsync; the far side restores the entry', async () => {
      const user = encodeURIComponent(userInfo().username);
      ship = await startShip({
        REPLICATE_TO: `sftp://${user}@127.0.0.1:${port}${shore}`,
        REPLICATE_SSH_KEY: path.join(keys, 'ship_key'),
        REPLICATE_KNOWN_HOSTS: path.join(keys, 'known_hosts'),
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
      expect(sshdLog).toMatch(/Accepted publickey/);
      // rsync's ssh recorded the shore's host key (ssh-keygen -F finds hashed entries too).
      const known = execFileSync('ssh-keygen', ['-F', `[127.0.0.1]:${port}`, '-f', path.join(keys, 'known_hosts')], { encoding: 'utf8' });
      expect(known).toContain(readFileSync(path.join(keys, 'host_key.pub'), 'utf8').split(' ')[1]);
    }, 120_000);
  },
);
