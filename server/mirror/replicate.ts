/**
 * The ship's side of the shore copy: where the record goes (`REPLICATE_TO`), the Litestream
 * configuration for a thin satellite link, and the rsync passes that carry photos over the same
 * SSH. Kept free of the server's modules (no Express, no Drizzle), so the small process that
 * supervises Litestream loads nothing it does not use, and the shore side can import
 * `litestreamBinary` and the layout names from here.
 *
 * What the shore receives, under the replica directory:
 *   `db/`      Litestream's replica of the database file alone (generations, snapshots, WAL segments);
 *              the search index and the other files beside the database are derived or local and
 *              stay off the link;
 *   `photos/`  the photo store's files under their own keys.
 */
import { spawn } from 'node:child_process';
import { readdirSync, statSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import path from 'node:path';

/** Sub-folders of the replica directory: the record's replica and the photos. */
export const REPLICA_DB_DIR = 'db';
export const REPLICA_PHOTOS_DIR = 'photos';

export type ReplicaTarget = { kind: 'file'; dir: string } | { kind: 'sftp'; user: string; host: string; port: number; dir: string };

/**
 * Reads `REPLICATE_TO`: `sftp://user@host[:port]/absolute/dir`, `file:///dir`, or a plain path.
 * Throws with a sentence a person can act on.
 */
export function parseReplicateTo(value: string): ReplicaTarget {
  const text = value.trim();
  if (/^sftp:\/\//i.test(text)) {
    const url = new URL(text);
    const user = decodeURIComponent(url.username);
    const dir = decodeURIComponent(url.pathname);
    if (!user) throw new Error(`REPLICATE_TO ${text}: name the shore account, as sftp://user@host/dir`);
    if (!url.hostname) throw new Error(`REPLICATE_TO ${text}: name the shore machine, as sftp://user@host/dir`);
    if (dir.length < 2) throw new Error(`REPLICATE_TO ${text}: name the directory on the shore machine, as sftp://user@host/dir`);
    if (url.password) throw new Error('REPLICATE_TO: a password in the address is not accepted; use an SSH key (REPLICATE_SSH_KEY)');
    return { kind: 'sftp', user, host: url.hostname, port: url.port ? Number(url.port) : 22, dir };
  }
  if (/^file:\/\//i.test(text)) return { kind: 'file', dir: path.resolve(decodeURIComponent(new URL(text).pathname)) };
  if (/^[a-z][a-z0-9+.-]*:\/\//i.test(text)) throw new Error(`REPLICATE_TO ${text}: only sftp:// addresses and directories are supported`);
  if (!text) throw new Error('REPLICATE_TO is empty');
  return { kind: 'file', dir: path.resolve(text) };
}

/** The Litestream binary that `@flydotio/litestream` installs for this platform. */
export function litestreamBinary(): string {
  const require = createRequire(__filename);
  return require.resolve(`@flydotio/litestream-${process.platform}-${process.arch}/litestream`);
}

export type ShipSettings = {
  databasePath: string;
  uploadsDir: string;
  target: ReplicaTarget;
  /** Private key for the shore account (Litestream's SFTP and rsync's ssh alike). */
  sshKey?: string;
  /** known_hosts file for rsync's ssh; its own default when unset. */
  knownHosts?: string;
  /** Seconds between photo passes. */
  photosIntervalS: number;
  /** rsync's --bwlimit in KiB/s, so originals never crowd out the record on the link; 0 for none. */
  photosBwLimit: number;
  /**
   * Seconds without a new photo before originals go (e.g. after the dive); 0 sends them in every
   * pass. Thumbnails and display sizes never wait; ashore, an original opened before it arrives
   * is fetched from the ship.
   */
  originalsAfterS: number;
};

/** Reads the ship's replication settings from the environment; `undefined` without `REPLICATE_TO`. */
export function shipSettings(env: Record<string, string | undefined>): ShipSettings | undefined {
  if (!env.REPLICATE_TO) return undefined;
  const number = (name: string, fallback: number) => {
    const raw = env[name];
    if (raw === undefined || raw === '') return fallback;
    const n = Number(raw);
    if (!Number.isFinite(n) || n < 0) throw new Error(`${name} must be a number of at least 0, not ${JSON.stringify(raw)}`);
    return n;
  };
  return {
    databasePath: path.resolve(env.DATABASE_PATH || 'data/bathynote.db'),
    uploadsDir: path.resolve(env.UPLOADS_DIR || 'uploads/'),
    target: parseReplicateTo(env.REPLICATE_TO),
    sshKey: env.REPLICATE_SSH_KEY ? path.resolve(env.REPLICATE_SSH_KEY) : undefined,
    knownHosts: env.REPLICATE_KNOWN_HOSTS ? path.resolve(env.REPLICATE_KNOWN_HOSTS) : undefined,
    photosIntervalS: number('REPLICATE_PHOTOS_INTERVAL', 30),
    photosBwLimit: number('REPLICATE_PHOTOS_BWLIMIT', 0),
    originalsAfterS: number('REPLICATE_ORIGINALS_AFTER', 0),
  };
}

/**
 * Litestream's settings for a thin link. WAL segments go out every second (an entry reaches the
 * shore within seconds while the link is up). A full snapshot goes out only when a generation
 * starts and then once in 30 days: Litestream makes a new snapshot whenever the newest one is
 * older than the retention, so a short retention would send the whole database across the link
 * again and again; a long one also keeps every segment the shore may still need after an outage,
 * so the backlog is sent and nothing is uploaded twice.
 */
export function litestreamConfig(settings: Pick<ShipSettings, 'databasePath' | 'target' | 'sshKey'>): string {
  const q = (s: string) => JSON.stringify(s);
  const { target } = settings;
  const replicaDir = path.posix.join(target.dir, REPLICA_DB_DIR);
  const replica =
    target.kind === 'file'
      ? [`      - type: file`, `        path: ${q(path.join(target.dir, REPLICA_DB_DIR))}`]
      : [
          `      - type: sftp`,
          `        host: ${q(`${target.host}:${target.port}`)}`,
          `        user: ${q(target.user)}`,
          `        path: ${q(replicaDir)}`,
          ...(settings.sshKey ? [`        key-path: ${q(settings.sshKey)}`] : []),
        ];
  return [
    'dbs:',
    `  - path: ${q(settings.databasePath)}`,
    '    monitor-interval: 1s',
    '    replicas:',
    ...replica,
    '        sync-interval: 1s',
    '        snapshot-interval: 720h',
    '        retention: 720h',
    '        retention-check-interval: 1h',
    '',
  ].join('\n');
}

/** The ssh command rsync runs: the key and port of the shore account, never a password prompt. */
export function sshCommand(settings: Pick<ShipSettings, 'target' | 'sshKey' | 'knownHosts'>): string[] {
  if (settings.target.kind !== 'sftp') return [];
  return [
    'ssh',
    '-p',
    String(settings.target.port),
    '-o',
    'BatchMode=yes',
    '-o',
    'ConnectTimeout=20',
    '-o',
    'ServerAliveInterval=15',
    // The first connection (in port, while seeding) records the shore's key; a changed key is refused.
    '-o',
    'StrictHostKeyChecking=accept-new',
    // One connection kept open between passes: a new SSH handshake each pass costs kilobytes of link.
    '-o',
    'ControlMaster=auto',
    '-o',
    `ControlPath=${path.join(tmpdir(), 'bathynote-ssh-%C')}`,
    '-o',
    'ControlPersist=300',
    ...(settings.knownHosts ? ['-o', `UserKnownHostsFile=${settings.knownHosts}`] : []),
    ...(settings.sshKey ? ['-i', settings.sshKey, '-o', 'IdentitiesOnly=yes'] : []),
  ];
}

/** rsync's arguments for one pass: the small sizes only, or every file. */
export function rsyncArgs(settings: Omit<ShipSettings, 'photosIntervalS' | 'databasePath'>, pass: 'small' | 'all'): string[] {
  const { target } = settings;
  const destination =
    target.kind === 'file'
      ? `${path.join(target.dir, REPLICA_PHOTOS_DIR)}/`
      : `${target.user}@${target.host}:${path.posix.join(target.dir, REPLICA_PHOTOS_DIR)}/`;
  const ssh = sshCommand(settings);
  return [
    '--recursive',
    '--times',
    '--mkpath',
    // A file cut off by an outage is resumed from where it stopped, not sent again.
    '--partial-dir=.rsync-partial',
    // rsync leaves jpg, png and webp uncompressed on its own; the rest (none today) is compressed.
    '--compress',
    '--exclude=.incoming/',
    '--exclude=.rsync-partial/',
    ...(pass === 'small' ? ['--include=*/', '--include=*-thumb.*', '--include=*-display.*', '--exclude=*'] : []),
    ...(settings.photosBwLimit > 0 ? [`--bwlimit=${settings.photosBwLimit}`] : []),
    ...(ssh.length ? ['-e', ssh.map((a) => (/[\s"'\\]/.test(a) ? `'${a.replace(/'/g, `'\\''`)}'` : a)).join(' ')] : []),
    `${settings.uploadsDir}/`,
    destination,
  ];
}

const RSYNC = '/usr/bin/rsync';

function runRsync(args: string[]): Promise<{ code: number; stderr: string }> {
  return new Promise((resolve) => {
    let stderr = '';
    const child = spawn(RSYNC, args, { stdio: ['ignore', 'ignore', 'pipe'] });
    child.stderr.on('data', (d: Buffer) => (stderr = (stderr + d.toString()).slice(-2000)));
    child.once('error', (err) => resolve({ code: -1, stderr: err.message }));
    child.once('exit', (code) => resolve({ code: code ?? -1, stderr }));
  });
}

/** What the photo store holds, in one string: a pass is needed only when it changes. */
function storeSignature(dir: string): string {
  let files = 0;
  let bytes = 0;
  let newest = 0;
  try {
    for (const e of readdirSync(dir, { recursive: true, withFileTypes: true })) {
      if (!e.isFile() || e.parentPath.includes(`${path.sep}.incoming`)) continue;
      const st = statSync(path.join(e.parentPath, e.name), { throwIfNoEntry: false });
      if (!st) continue;
      files++;
      bytes += st.size;
      newest = Math.max(newest, st.mtimeMs);
    }
  } catch {
    // No photo store yet.
  }
  return `${files}:${bytes}:${newest}`;
}

export type PhotoShipper = {
  /** One pass now (thumbnails and display sizes, then originals), unless one is already running. */
  syncNow: () => Promise<boolean>;
  stop: () => Promise<void>;
};

/**
 * Sends photos to the shore at an interval: each pass first sends every thumbnail and display
 * size, which readers ashore see first, then the originals. A pass that fails (the link is down)
 * is simply tried again at the next interval; rsync sends only what the shore lacks.
 */
export function startPhotoShipper(settings: ShipSettings, log: (line: string) => void): PhotoShipper {
  let running: Promise<boolean> | undefined;
  let stopped = false;
  let lastFailure = '';
  let sent = '';
  let sentSmall = '';
  const pass = async (): Promise<boolean> => {
    // Nothing new since the last pass that went through: the link stays quiet.
    const signature = storeSignature(settings.uploadsDir);
    if (signature === sent) return true;
    const newest = Number(signature.split(':')[2]);
    const originalsDue = Date.now() - newest >= settings.originalsAfterS * 1000;
    if (!originalsDue && signature === sentSmall) return true;
    for (const which of originalsDue ? (['small', 'all'] as const) : (['small'] as const)) {
      if (stopped) return false;
      const { code, stderr } = await runRsync(rsyncArgs(settings, which));
      // 23 and 24: some files vanished or could not be read mid-pass; the next pass takes them.
      if (code !== 0 && code !== 23 && code !== 24) {
        const failure = `photos to the shore: rsync stopped (exit ${code}): ${stderr.trim().split('\n').pop() ?? ''}`;
        if (failure !== lastFailure) log(failure);
        lastFailure = failure;
        return false;
      }
    }
    if (lastFailure) log('photos to the shore: sending again');
    lastFailure = '';
    sentSmall = signature;
    if (originalsDue) sent = signature;
    return true;
  };
  const syncNow = () => (running ??= pass().finally(() => (running = undefined)));
  const timer = setInterval(() => void syncNow(), Math.max(1, settings.photosIntervalS) * 1000);
  void syncNow();
  return {
    syncNow,
    stop: async () => {
      stopped = true;
      clearInterval(timer);
      await running;
      // The connection kept open between passes is closed with the server, not left behind.
      const [ssh, ...options] = sshCommand(settings);
      if (ssh && settings.target.kind === 'sftp') {
        const closer = spawn(ssh, [...options, '-O', 'exit', `${settings.target.user}@${settings.target.host}`], { stdio: 'ignore' });
        await new Promise((resolve) => {
          closer.once('exit', resolve);
          closer.once('error', resolve);
        });
      }
    },
  };
}
