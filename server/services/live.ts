import { EventEmitter } from 'node:events';

import type { Statement } from 'better-sqlite3';

import type { Db, Executor } from '../../db/client';

export type LiveEventType =
  | 'observation.created'
  | 'observation.updated'
  | 'observation.retired'
  | 'observation.restored'
  | 'dive.updated'
  | 'dive.restamped'
  // A handover note written at a change of watch, or acknowledged; the payload is the note.
  | 'handover.written'
  | 'handover.acknowledged';

export type LiveEvent = {
  id: number;
  campaignId: string;
  diveId: string;
  type: LiveEventType;
  payload: unknown;
  at: Date;
  /** The event as one Server-Sent Events frame, written once however many readers there are. */
  frame: string;
};

/**
 * What a dive's readers are told at once: the events of one commit for that dive, in order, and
 * their frames joined, so each reader gets one write however many events the commit held.
 */
export type ToldEvents = { events: LiveEvent[]; frames: string };

/** Records one event inside the change's transaction (see `LiveHub.withEvents`). */
export type StageEvent = (campaignId: string, diveId: string, type: LiveEventType, payload: unknown, at?: Date) => LiveEvent;

export const sseFrame = (id: number, type: string, payload: unknown) => sseFrameOf(id, type, JSON.stringify(payload));
/** The frame of an event whose payload is already JSON. */
const sseFrameOf = (id: number, type: string, data: string) => `id: ${id}\nevent: ${type}\ndata: ${data}\n\n`;

/**
 * How many of a dive's readers are told in one turn of the event loop. Telling is a socket write
 * per reader; a dive followed by hundreds is told in slices, with the requests that arrived
 * meanwhile handled between them, so no write waits behind the whole crowd of readers.
 */
export const READERS_PER_TURN = 25;

type Reader = (told: ToldEvents) => void;

/**
 * The dive's live feed. Every change is written to `live_events` (so a reader who reconnects
 * with Last-Event-ID gets what it missed, even across a restart) and then told to the readers
 * connected to this process.
 */
export class LiveHub {
  private readonly emitter = new EventEmitter();

  constructor(private readonly db: Db) {
    this.emitter.setMaxListeners(0);
  }

  /** Events staged by the transaction in progress, told to readers once it commits. */
  private staged: LiveEvent[] | null = null;

  /**
   * Runs a change and the live events it causes as one transaction: `stage` writes each event to
   * `live_events` inside it, so the change and its replay are one commit, and the readers are
   * told only after that commit. A change that throws rolls back with its events, and no reader
   * ever hears of it. Called inside another `withEvents`, it joins the outer transaction and its
   * events wait for the outer commit.
   */
  withEvents<T>(work: (tx: Executor, stage: StageEvent) => T): T {
    const { result, events } = this.committed(work);
    this.tellUntold();
    this.tell(events);
    return result;
  }

  /**
   * `withEvents` without telling the readers: the result and the events the commit holds (none
   * when it joined an outer transaction, whose commit tells them), for the caller to tell.
   */
  private committed<T>(work: (tx: Executor, stage: StageEvent) => T): { result: T; events: LiveEvent[] } {
    const outer = this.staged;
    const mine: LiveEvent[] = [];
    this.staged = mine;
    let result: T;
    try {
      // The connection's own transaction (a savepoint when nested), with the database as the
      // executor: the query builder's transaction object costs more to set up than a small change
      // costs to run, and a group commit opens one for every change it holds.
      result = this.db.$client.transaction(() =>
        work(this.db, (campaignId, diveId, type, payload, at = new Date()) => {
          const event = this.write(campaignId, diveId, type, payload, at);
          mine.push(event);
          return event;
        }),
      )();
    } finally {
      this.staged = outer;
    }
    if (outer) {
      outer.push(...mine);
      return { result, events: [] };
    }
    return { result, events: mine };
  }

  /** How many group commits ran and how many changes they held (for tests and benchmarks). */
  readonly groupCommits = { groups: 0, changes: 0 };

  /** Changes waiting for the next group commit, in the order they arrived. */
  private waiting: { work: () => unknown; settle: (outcome: { value: unknown } | { error: unknown }) => void }[] = [];

  /**
   * Group commit: a change handed here waits for the rest of this turn of the event loop, and all
   * the changes that arrived meanwhile are committed together in one transaction, so one disk
   * flush (synchronous=FULL) serves them all. Each runs in a savepoint of its own (its
   * `withEvents` nests), so one that fails rolls back only its own work and rejects only its own
   * promise. Every promise settles after the commit that holds its change, so a request is
   * answered only once its change is on disk; the events are told after that commit too, once
   * the group's answers are on their way (a microtask queued behind the settled promises' own):
   * writing one event to two hundred readers' streams takes milliseconds that no writer waits on.
   */
  inGroupCommit<T>(work: () => T): Promise<T> {
    return new Promise<T>((resolve, reject) => {
      this.waiting.push({
        work,
        settle: (o) => ('error' in o ? reject(o.error instanceof Error ? o.error : new Error(String(o.error))) : resolve(o.value as T)),
      });
      if (this.waiting.length === 1) setImmediate(() => this.commitGroup());
    });
  }

  private commitGroup(): void {
    const group = this.waiting;
    this.waiting = [];
    this.groupCommits.groups++;
    this.groupCommits.changes += group.length;
    const outcomes: ({ value: unknown } | { error: unknown })[] = [];
    let events: LiveEvent[];
    try {
      ({ events } = this.committed(() => {
        for (const { work } of group) {
          try {
            outcomes.push({ value: work() });
          } catch (error) {
            outcomes.push({ error });
          }
        }
      }));
    } catch (error) {
      for (const { settle } of group) settle({ error });
      return;
    }
    group.forEach(({ settle }, i) => settle(outcomes[i]!));
    if (events.length > 0) {
      this.untold.push(...events);
      queueMicrotask(() => this.tellUntold());
    }
  }

  /** Events of group commits committed but not yet told; any later commit tells them first, so readers hear every event in order. */
  private untold: LiveEvent[] = [];

  private tellUntold(): void {
    const events = this.untold;
    this.untold = [];
    this.tell(events);
  }

  /** The event insert, prepared once: it runs on the transaction's own connection. */
  private insertEvent: Statement<[string, string, string, string, number], number> | null = null;

  private write(campaignId: string, diveId: string, type: LiveEventType, payload: unknown, at: Date): LiveEvent {
    this.insertEvent ??= this.db.$client
      .prepare<[string, string, string, string, number], number>(
        'insert into live_events (campaign_id, dive_id, type, payload, at) values (?, ?, ?, ?, ?) returning id',
      )
      .pluck();
    // One serialisation serves the stored row and the frame every reader is sent.
    const data = JSON.stringify(payload);
    const id = this.insertEvent.get(campaignId, diveId, type, data, at.getTime())!;
    return { id, campaignId, diveId, type, payload, at, frame: sseFrameOf(id, type, data) };
  }

  /** Each dive's readers. */
  private readonly readers = new Map<string, Set<Reader>>();
  /**
   * Tellings under way, oldest first: each reader hears them in this order, and a telling lists
   * the readers there were when it was committed (one who comes later reads it from the
   * database instead, when it reconnects with Last-Event-ID).
   */
  private telling: { told: ToldEvents; readers: Reader[]; current: Set<Reader>; next: number }[] = [];
  private sliceDue = false;

  private tellReaders(diveId: string, told: ToldEvents): void {
    const readers = this.readers.get(diveId);
    if (!readers || readers.size === 0) return;
    if (this.telling.length === 0 && readers.size <= READERS_PER_TURN) {
      for (const reader of readers) reader(told);
      return;
    }
    this.telling.push({ told, readers: [...readers], current: readers, next: 0 });
    // The first slice now; the rest in the turns after, unless a slice is already due.
    if (!this.sliceDue) this.tellSlice();
  }

  private readonly tellSlice = (): void => {
    this.sliceDue = false;
    let left = READERS_PER_TURN;
    while (left > 0 && this.telling.length > 0) {
      const job = this.telling[0]!;
      const end = Math.min(job.readers.length, job.next + left);
      for (let i = job.next; i < end; i++) {
        const reader = job.readers[i]!;
        // One who left meanwhile is told no more.
        if (job.current.has(reader)) reader(job.told);
      }
      left -= end - job.next;
      job.next = end;
      if (end === job.readers.length) this.telling.shift();
    }
    if (this.telling.length > 0) {
      this.sliceDue = true;
      setImmediate(this.tellSlice);
    }
  };

  /** Tells an event committed elsewhere (a shore mirror relays the ship's this way), in order with this hub's own. */
  relay(event: LiveEvent): void {
    this.tell([event]);
  }

  /**
   * Tells committed events, in order: to every-event listeners one by one, and to each dive's
   * readers as one `ToldEvents` per dive, so a group commit of twenty entries costs a reader one
   * write instead of twenty (with two hundred readers, the writes are most of the telling).
   */
  private tell(events: LiveEvent[]): void {
    if (events.length === 0) return;
    for (const event of events) this.emitter.emit('any', event);
    if (events.length === 1) {
      const event = events[0]!;
      this.tellReaders(event.diveId, { events, frames: event.frame });
      return;
    }
    const byDive = new Map<string, LiveEvent[]>();
    for (const event of events) {
      const list = byDive.get(event.diveId);
      if (list) list.push(event);
      else byDive.set(event.diveId, [event]);
    }
    for (const [diveId, list] of byDive) {
      this.tellReaders(diveId, { events: list, frames: list.map((e) => e.frame).join('') });
    }
  }

  /**
   * A dive's reader: told each commit's events of the dive at once, in commit order; maybe a
   * few turns of the event loop after the commit, when the dive has many readers.
   */
  subscribe(diveId: string, reader: Reader): () => void {
    let readers = this.readers.get(diveId);
    if (!readers) this.readers.set(diveId, (readers = new Set()));
    readers.add(reader);
    return () => {
      readers.delete(reader);
      if (readers.size === 0 && this.readers.get(diveId) === readers) this.readers.delete(diveId);
    };
  }

  /** Every event of every dive (for tests and benchmarks). */
  subscribeAll(listener: (e: LiveEvent) => void): () => void {
    this.emitter.on('any', listener);
    return () => this.emitter.off('any', listener);
  }

  /** A session ended (signed out or revoked): its open streams close at once. */
  endSession(token: string): void {
    this.emitter.emit('session-ended', token);
  }

  /** Someone's role in a campaign changed or they were removed: their streams check again. */
  membershipChanged(campaignId: string, userId: string): void {
    this.emitter.emit('membership', { campaignId, userId });
  }

  onSessionEnded(listener: (token: string) => void): () => void {
    this.emitter.on('session-ended', listener);
    return () => this.emitter.off('session-ended', listener);
  }

  onMembershipChanged(listener: (change: { campaignId: string; userId: string }) => void): () => void {
    this.emitter.on('membership', listener);
    return () => this.emitter.off('membership', listener);
  }
}
