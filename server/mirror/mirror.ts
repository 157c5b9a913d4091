import { existsSync } from 'node:fs';
import path from 'node:path';

import type { Db } from '../../db/client';
import type { Logger } from '../services/logger';
import { sseFrame, type LiveEvent, type LiveEventType, type LiveHub } from '../services/live';
import { openIndexStore } from '../services/search/store';
import { checkCopy, removeDatabaseFiles, replicaFingerprint, restoreCopy, swapIn } from './restore';
import { ShipSessions } from './sessions';

export type MirrorSettings = {
  /** The ship's public URL, without a trailing slash. */
  of: string;
  /** Where the replica arrives (Litestream's replica under `db/`, photos under `photos/`). */
  replica: string;
  databasePath: string;
  intervalMs: number;
  /** The secret the ship's mirror stream asks for. */
  key?: string;
};

export type MirrorStatus = { of: string; lagSeconds: number; link: 'up' | 'down'; restoredAt: string | null };

/** Events relayed from the ship that the restored copy does not hold yet, with when each arrived. */
type Relayed = LiveEvent & { arrivedAt: number };

/** How long after a write made through the mirror its author's reads still go to the ship. */
const WRITE_SETTLE_MS = 3000;

/**
 * The shore copy: restores the ship's record from the replica at an interval and swaps each good
 * copy in, relays the ship's live events to the shore's readers over one upstream stream, and
 * knows how far behind the ship it is.
 *
 * Lag: the copy is known to be current as of the start of the last restore that succeeded, and,
 * while the stream from the ship is down, no later than the moment it went down; an event relayed
 * from the ship that the copy does not hold yet makes it behind since that event arrived. The lag
 * is now minus the earliest of these instants.
 */
const mirrors = new WeakMap<LiveHub, Mirror>();

/**
 * On a shore mirror, the relayed events of a dive after `lastSeen` that the restored copy does not
 * hold yet, for a reader who reconnects; elsewhere none.
 */
export function relayedSince(live: LiveHub, diveId: string, lastSeen: number): LiveEvent[] {
  return mirrors.get(live)?.relayedAfter(diveId, lastSeen) ?? [];
}

/**
 * On a shore mirror, whether a session the copy does not hold yet is one the ship vouched for
 * within the bounded time of its check (a live stream asks this at each heartbeat).
 */
export function shoreVouchesFor(live: LiveHub, token: string): boolean {
  return mirrors.get(live)?.sessions.vouched(token) ?? false;
}

export class Mirror {
  private db: Db | null = null;
  private live: LiveHub | null = null;
  private log: Logger | null = null;
  private timer: NodeJS.Timeout | null = null;
  private stopped = false;
  private upstream: AbortController | null = null;

  /** Newest live event in the copy now in place. */
  private copyEventId = 0;
  /** Start of the last restore that succeeded (ms), or 0 before the first. */
  private currentAsOf = 0;
  private linkUp = false;
  private readonly startedAt = Date.now();
  private linkLostAt = Date.now();
  private relayed: Relayed[] = [];
  /** Newest event id the relay has seen (the upstream stream resumes after it). */
  private relayedUpTo = 0;
  /** Sessions that wrote through the mirror, and when. */
  private readonly writes = new Map<string, number>();
  private restoring: Promise<boolean> | null = null;
  private readonly swapListeners: (() => void)[] = [];
  /** The replica's files (names and sizes) when the copy in place was restored from it. */
  private restoredFrom: string | null = null;
  /** Why the last restore brought no copy, or null when it did. */
  lastRefusal: string | null = null;

  /** Sessions checked against the ship that the copy does not hold yet, and sessions the ship ended. */
  readonly sessions: ShipSessions;

  constructor(readonly settings: MirrorSettings) {
    this.sessions = new ShipSessions(new URL(settings.of));
  }

  status(now = Date.now()): MirrorStatus {
    // Before any restore in this run, the copy on disk is as old as the start.
    const since = [this.currentAsOf || this.startedAt];
    if (!this.linkUp) since.push(this.linkLostAt);
    const pending = this.relayed.find((e) => e.id > this.copyEventId);
    if (pending) since.push(pending.arrivedAt);
    const asOf = Math.min(...since);
    return {
      of: this.settings.of,
      lagSeconds: Math.max(0, Math.round((now - asOf) / 1000)),
      link: this.linkUp ? 'up' : 'down',
      restoredAt: this.currentAsOf ? new Date(this.currentAsOf).toISOString() : null,
    };
  }

  /**
   * Before the server opens the database: a live file left from an earlier run is used when it
   * passes its check; otherwise restores are tried until one brings a good copy.
   */
  async prepare(log: (line: string) => void): Promise<void> {
    const file = path.resolve(this.settings.databasePath);
    if (existsSync(file)) {
      try {
        this.copyEventId = checkCopy(file).lastEventId;
        return;
      } catch (err) {
        log(`the shore copy on disk is refused (${(err as Error).message}); restoring a new one`);
        removeDatabaseFiles(file);
      }
    }
    for (;;) {
      try {
        const copy = await restoreCopy(this.settings.replica, this.settings.databasePath);
        if (copy) {
          await swapIn(copy, this.settings.databasePath);
          this.copyEventId = copy.lastEventId;
          this.currentAsOf = Date.now();
          return;
        }
        log(`the replica at ${this.settings.replica} holds nothing yet; waiting for the ship`);
      } catch (err) {
        log(`no shore copy yet: ${(err as Error).message}`);
      }
      await new Promise((r) => setTimeout(r, Math.min(this.settings.intervalMs, 5000)));
    }
  }

  /** Starts the restore loop and the relay, on the server's own connection and live hub. */
  start(db: Db, live: LiveHub, log: Logger): void {
    this.db = db;
    this.live = live;
    this.sessions.attach(db);
    mirrors.set(live, this);
    this.log = log;
    const tick = () => {
      if (this.stopped) return;
      void this.restoreNow().finally(() => {
        if (!this.stopped) this.timer = setTimeout(tick, this.settings.intervalMs);
      });
    };
    this.timer = setTimeout(tick, this.currentAsOf ? this.settings.intervalMs : 0);
    this.relayedUpTo = this.copyEventId;
    void this.follow();
  }

  stop(): void {
    this.stopped = true;
    if (this.timer) clearTimeout(this.timer);
    this.upstream?.abort();
  }

  /** One restore and swap; resolves whether a copy was put in place. Concurrent calls share one. */
  restoreNow(): Promise<boolean> {
    this.restoring ??= this.restoreOnce().finally(() => (this.restoring = null));
    return this.restoring;
  }

  /** Called after each copy is put in place (e.g. to check cached sessions again). */
  onSwap(listener: () => void): void {
    this.swapListeners.push(listener);
  }

  private async restoreOnce(): Promise<boolean> {
    const startedAt = Date.now();
    try {
      // Litestream only ever adds files or grows them: the same files at the same sizes restore
      // the same copy, so an idle ship costs the shore no restore.
      const fingerprint = replicaFingerprint(this.settings.replica);
      if (fingerprint !== null && fingerprint === this.restoredFrom) {
        this.currentAsOf = startedAt;
        this.lastRefusal = null;
        return false;
      }
      const copy = await restoreCopy(this.settings.replica, this.settings.databasePath);
      if (!copy) return false;
      await swapIn(copy, this.settings.databasePath);
      this.copyEventId = copy.lastEventId;
      this.currentAsOf = startedAt;
      this.relayed = this.relayed.filter((e) => e.id > copy.lastEventId);
      this.lastRefusal = null;
      this.restoredFrom = fingerprint;
      this.sessions.afterCopy(startedAt);
      this.afterSwap();
      for (const listener of this.swapListeners) listener();
      return true;
    } catch (err) {
      this.lastRefusal = err instanceof Error ? err.message : String(err);
      this.log?.error('shore copy not restored', { reason: this.lastRefusal });
      return false;
    }
  }

  /** The search index is caught up with what the new copy changed (from its high-water mark). */
  private afterSwap(): void {
    const db = this.db;
    if (!db) return;
    const attached = (db.$client.pragma('database_list') as { name: string }[]).some((d) => d.name === 'search');
    if (!attached) return;
    db.$client.exec('detach database search');
    openIndexStore(db, this.settings.databasePath);
  }

  /** A write through the mirror: its author's reads go to the ship until a later copy is in place. */
  noteWrite(token: string): void {
    if (this.writes.size > 10_000) this.writes.clear();
    this.writes.set(token, Date.now());
  }

  /** Whether this session's reads go to the ship (it wrote something the copy may not hold yet). */
  readsFromShip(token: string): boolean {
    const at = this.writes.get(token);
    if (at === undefined) return false;
    if (this.currentAsOf > at + WRITE_SETTLE_MS) {
      this.writes.delete(token);
      return false;
    }
    return true;
  }

  /** Events relayed for a dive after an id that the copy does not hold yet (for a reader's replay). */
  relayedAfter(diveId: string, lastSeen: number): LiveEvent[] {
    return this.relayed.filter((e) => e.diveId === diveId && e.id > lastSeen && e.id > this.copyEventId);
  }

  /** The newest relayed state of each entry of a dive that the copy does not hold yet. */
  pendingEntries(diveId: string): Map<string, unknown> {
    const entries = new Map<string, unknown>();
    for (const e of this.relayed) {
      if (e.diveId !== diveId || e.id <= this.copyEventId || !e.type.startsWith('observation.')) continue;
      const id = (e.payload as { id?: unknown }).id;
      if (typeof id === 'string') entries.set(id, e.payload);
    }
    return entries;
  }

  /** The newest relayed state of one entry that the copy does not hold yet, with its campaign. */
  pendingEntry(entryId: string): { campaignId: string; payload: unknown } | undefined {
    for (let i = this.relayed.length - 1; i >= 0; i--) {
      const e = this.relayed[i]!;
      if (e.id <= this.copyEventId) break;
      if (e.type.startsWith('observation.') && (e.payload as { id?: unknown }).id === entryId)
        return { campaignId: e.campaignId, payload: e.payload };
    }
    return undefined;
  }

  /** The connection to the copy in place, once started. */
  get copy(): Db | null {
    return this.db;
  }

  /** One stream from the ship for every shore reader, resumed after the last event it relayed. */
  private async follow(): Promise<void> {
    while (!this.stopped) {
      this.upstream = new AbortController();
      try {
        const res = await fetch(`${this.settings.of}/api/mirror/stream`, {
          headers: { 'x-mirror-key': this.settings.key ?? '', 'last-event-id': String(this.relayedUpTo), accept: 'text/event-stream' },
          signal: this.upstream.signal,
        });
        if (!res.ok || !res.body) throw new Error(`the ship answered ${res.status}`);
        // While the stream was down a session may have ended unheard: every session is checked again.
        if (!this.linkUp) this.sessions.forgetChecks();
        this.linkUp = true;
        let buffer = '';
        const decoder = new TextDecoder();
        const reader = res.body.getReader();
        for (;;) {
          const { done, value } = await reader.read();
          if (done) break;
          buffer += decoder.decode(value, { stream: true });
          let end: number;
          while ((end = buffer.indexOf('\n\n')) >= 0) {
            this.frame(buffer.slice(0, end));
            buffer = buffer.slice(end + 2);
          }
        }
      } catch (err) {
        if (!this.stopped) this.log?.error('stream from the ship lost', { reason: err instanceof Error ? err.message : String(err) });
      }
      if (this.linkUp) {
        this.linkUp = false;
        this.linkLostAt = Date.now();
      }
      if (!this.stopped) await new Promise((r) => setTimeout(r, 2000));
    }
  }

  private frame(text: string): void {
    let id = NaN;
    let type = '';
    let data = '';
    for (const line of text.split('\n')) {
      if (line.startsWith('id: ')) id = Number(line.slice(4));
      else if (line.startsWith('event: ')) type = line.slice(7);
      else if (line.startsWith('data: ')) data += line.slice(6);
    }
    if (type === 'session.ended') {
      const { token } = JSON.parse(data) as { token?: unknown };
      if (typeof token !== 'string') return;
      this.sessions.end(token);
      // The shore's own session cache forgets it and its live streams close, as on the ship.
      this.live?.endSession(token);
      return;
    }
    if (!Number.isInteger(id) || !type || id <= this.relayedUpTo) return;
    const body = JSON.parse(data) as { campaignId: string; diveId: string; at: string; payload: unknown };
    this.relayedUpTo = id;
    const event: Relayed = {
      id,
      campaignId: body.campaignId,
      diveId: body.diveId,
      type: type as LiveEventType,
      payload: body.payload,
      at: new Date(body.at),
      frame: sseFrame(id, type, body.payload),
      arrivedAt: Date.now(),
    };
    if (this.relayed.length > 5000) this.relayed.shift();
    this.relayed.push(event);
    this.live?.relay(event);
  }
}
