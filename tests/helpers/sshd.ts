/**
 * A local OpenSSH server standing for the shore machine: Debian's sshd with its own host key,
 * configuration and authorized key (the ship's) in a temporary folder, on a free port, run as the
 * current user. Used by the SSH test and the shore benchmark.
 */
import { execFileSync, spawn } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';

import { freePort } from './server-process';

export const SSHD = '/usr/sbin/sshd';
export const haveSshd = existsSync(SSHD);

export type Sshd = { port: number; shipKey: string; knownHosts: string; hostKeyPub: string; log: () => string; stop: () => void };

export async function startSshd(dir: string): Promise<Sshd> {
  mkdirSync(dir, { recursive: true });
  const file = (name: string) => path.join(dir, name);
  execFileSync('ssh-keygen', ['-q', '-t', 'ed25519', '-N', '', '-f', file('host_key')]);
  execFileSync('ssh-keygen', ['-q', '-t', 'ed25519', '-N', '', '-f', file('ship_key')]);
  writeFileSync(file('authorized_keys'), readFileSync(file('ship_key.pub')));
  // As root, sshd wants its privilege-separation folder; as anyone else it runs without one.
  if (process.getuid?.() === 0) mkdirSync('/run/sshd', { recursive: true });
  const port = await freePort();
  writeFileSync(
    file('sshd_config'),
    [
      `Port ${port}`,
      'ListenAddress 127.0.0.1',
      `HostKey ${file('host_key')}`,
      `AuthorizedKeysFile ${file('authorized_keys')}`,
      `PidFile ${file('sshd.pid')}`,
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
  let log = '';
  const child = spawn(SSHD, ['-D', '-e', '-f', file('sshd_config')], { stdio: ['ignore', 'ignore', 'pipe'] });
  child.stderr.on('data', (d: Buffer) => (log += d.toString()));
  const deadline = Date.now() + 10_000;
  while (!log.includes('Server listening')) {
    if (child.exitCode !== null || Date.now() > deadline) throw new Error(`sshd did not start:\n${log}`);
    await new Promise((r) => setTimeout(r, 100));
  }
  return {
    port,
    shipKey: file('ship_key'),
    knownHosts: file('known_hosts'),
    hostKeyPub: readFileSync(file('host_key.pub'), 'utf8'),
    log: () => log,
    stop: () => {
      child.kill('SIGTERM');
      rmSync(dir, { recursive: true, force: true });
    },
  };
}
