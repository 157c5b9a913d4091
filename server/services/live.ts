import { EventEmitter } from 'node:events';

import type { Db, Executor } from '../../db/client';
import { liveEvents } from '../../db/schema';

export type LiveEventType = 'observation.created' | 'observation.updated' | 'observation.retired' | 'observation.restored' | 'dive.updated';

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

/** Records one event inside the change's transaction (see `LiveHub.withEvents`). */
export type StageEvent = (campaignId: string, diveId: string, type: LiveEventType, payload: unknown, at?: Date) => LiveEvent;

export const sseFrame = (id: number, type: string, payload: unknown) => `id: ${id}\nevent: ${type}\ndata: ${JSON.stringify(payload)}\n\n`;

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
    const outer = this.staged;
    const mine: LiveEvent[] = [];
    this.staged = mine;
    let result: T;
    try {
      result = this.db.transaction((tx) =>
        work(tx, (campaignId, diveId, type, payload, at = new Date()) => {
          const event = this.write(tx, campaignId, diveId, type, payload, at);
          mine.push(event);
          return event;
        }),
      );
    } finally {
      this.staged = outer;
    }
    if (outer) outer.push(...mine);
    else for (const event of mine) this.emit(event);
    return result;
  }

  private write(db: Executor, campaignId: string, diveId: string, type: LiveEventType, payload: unknown, at: Date): LiveEvent {
    const row = db.insert(liveEvents).values({ campaignId, diveId, type, payload, at }).returning({ id: liveEvents.id }).get();
    return { id: row.id, campaignId, diveId, type, payload, at, frame: sseFrame(row.id, type, payload) };
  }

  private emit(event: LiveEvent): void {
    this.emitter.emit(`dive:${event.diveId}`, event);
    this.emitter.emit('any', event);
  }

  subscribe(diveId: string, listener: (e: LiveEvent) => void): () => void {
    const key = `dive:${diveId}`;
    this.emitter.on(key, listener);
    return () => this.emitter.off(key, listener);
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
