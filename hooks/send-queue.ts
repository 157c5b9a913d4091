/**
 * The send queue: entries that could not be sent (no link, or the server did not answer) wait
 * here, on this device, and are sent again until they get through. Each carries a `clientRef`, so an entry
 * whose first send did arrive (but whose answer was lost) is not logged twice, and the id of the
 * person who wrote it: on a shared control-room screen an entry is only ever sent, shown or
 * discarded while its author is signed in.
 */
import { useQueryClient } from '@tanstack/react-query';
import { useCallback, useEffect, useSyncExternalStore } from 'react';

import { observationSchema, type Me, type Observation, type ObservationCreate } from '@/lib/schemas';
import { ApiError, request } from './api';
import { mergeIntoDiveLogs } from './cache-effects';
import { sessionKeys } from './query-keys';
import { useMe } from './session';
import { storage } from './storage';

export type WaitingEntry = {
  clientRef: string;
  /** Who wrote it (absent on entries kept before authors were recorded: shown to whoever signs in). */
  authorId?: string;
  diveId: string;
  body: ObservationCreate;
  queuedAt: string;
  attempts: number;
  lastError: string | null;
};

const KEY = 'bathynote.send-queue';
/** Where earlier versions of the app kept the queue: its entries are moved over, never dropped. */
const FORMER_KEY = 'bathynote.outbox';
const listeners = new Set<() => void>();
let cache: WaitingEntry[] | null = null;

function stored(key: string): WaitingEntry[] {
  try {
    const parsed: unknown = JSON.parse(storage.get(key) ?? '[]');
    return Array.isArray(parsed) ? (parsed as WaitingEntry[]) : [];
  } catch {
    return [];
  }
}

/**
 * Moves entries kept under the former key into the queue (once per start, and again should a tab
 * still running the earlier version have written there since), the queue's own copy winning on
 * the same `clientRef`.
 */
export function migrateFormerQueue() {
  const former = stored(FORMER_KEY);
  if (former.length === 0) {
    if (storage.get(FORMER_KEY) !== null) storage.remove(FORMER_KEY);
    return;
  }
  const current = stored(KEY);
  const known = new Set(current.map((p) => p.clientRef));
  storage.set(KEY, JSON.stringify([...current, ...former.filter((p) => !known.has(p.clientRef))]));
  storage.remove(FORMER_KEY);
  cache = null;
}

function read(): WaitingEntry[] {
  if (cache) return cache;
  migrateFormerQueue();
  cache = stored(KEY);
  return cache;
}

function write(next: WaitingEntry[]) {
  cache = next;
  storage.set(KEY, JSON.stringify(next));
  for (const l of listeners) l();
}

const subscribe = (l: () => void) => {
  listeners.add(l);
  return () => listeners.delete(l);
};

export function newClientRef(): string {
  const c = globalThis.crypto;
  return c?.randomUUID ? c.randomUUID() : `${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 12)}`;
}

/**
 * Whether a failed send is worth trying again (as opposed to a refusal the person must fix). A
 * session that ended (401) is worth it: the entry waits until its author signs in again.
 */
const retryable = (err: unknown) =>
  err instanceof ApiError && (err.isNetwork || err.status >= 500 || err.status === 429 || err.status === 401);

const mine = (p: WaitingEntry, userId: string | undefined) => !!userId && (p.authorId === undefined || p.authorId === userId);

function send(entry: Pick<WaitingEntry, 'diveId' | 'body' | 'clientRef'>): Promise<Observation> {
  return request(`/api/dives/${encodeURIComponent(entry.diveId)}/observations`, observationSchema, {
    body: { ...entry.body, clientRef: entry.clientRef },
  });
}

/** The signed-in person's entries still on this device (of one dive, or all). */
export function useWaitingEntries(diveId?: string): WaitingEntry[] {
  const all = useSyncExternalStore(subscribe, read, read);
  const userId = useMe().data?.user.id;
  return all.filter((p) => mine(p, userId) && (!diveId || p.diveId === diveId));
}

/**
 * Logs an entry: sent at once when the link is up, otherwise kept in the send queue and sent later.
 * Resolves with the stored entry, or with `{ queued: true, clientRef }` when it waits in the queue.
 */
export function useLogEntry(diveId: string) {
  const qc = useQueryClient();
  const authorId = useMe().data?.user.id;
  return useCallback(
    async (body: ObservationCreate): Promise<{ queued: false; observation: Observation } | { queued: true; clientRef: string }> => {
      const entry = { clientRef: newClientRef(), diveId, body: { ...body, observedAt: body.observedAt ?? new Date().toISOString() } };
      try {
        const observation = await send(entry);
        mergeIntoDiveLogs(qc, observation);
        return { queued: false, observation };
      } catch (err) {
        if (!retryable(err)) throw err;
        write([...read(), { ...entry, authorId, queuedAt: new Date().toISOString(), attempts: 1, lastError: (err as Error).message }]);
        return { queued: true, clientRef: entry.clientRef };
      }
    },
    [authorId, diveId, qc],
  );
}

/** Calls `done` once the kept entry has left the queue (sent, or discarded); answers a function that stops listening. */
export function onceLeftQueue(clientRef: string, done: () => void): () => void {
  const unsubscribe = subscribe(() => {
    if (!read().some((p) => p.clientRef === clientRef)) {
      unsubscribe();
      done();
    }
  });
  return () => void unsubscribe();
}

export function discardWaiting(clientRef: string) {
  write(read().filter((p) => p.clientRef !== clientRef));
}

/** Sends a refused entry again (after the person has fixed what the refusal named, or regained access). */
export function retryWaiting(clientRef: string) {
  write(read().map((p) => (p.clientRef === clientRef ? { ...p, attempts: 0 } : p)));
}

let flushing = false;

/** Sends whatever waits in the send queue, oldest first; keeps what still cannot be sent. */
export function useSendQueueFlush() {
  const qc = useQueryClient();
  const userId = useMe().data?.user.id;
  return useCallback(async () => {
    if (flushing || !userId) return;
    flushing = true;
    try {
      for (const { clientRef } of read().filter((p) => p.attempts >= 0 && mine(p, userId))) {
        // Sends take time on a slow link: an entry discarded meanwhile is not sent, and if its
        // author has signed out (someone else may have signed in), nothing more goes out.
        const entry = read().find((p) => p.clientRef === clientRef && p.attempts >= 0);
        if (!entry) continue;
        if (qc.getQueryData<Me | null>(sessionKeys.me())?.user.id !== userId) break;
        try {
          const observation = await send(entry);
          mergeIntoDiveLogs(qc, observation);
          write(read().filter((p) => p.clientRef !== entry.clientRef));
        } catch (err) {
          const lastError = err instanceof Error ? err.message : 'Not sent';
          if (!retryable(err)) {
            // The server refused it for good (e.g. the dive is gone): keep it visible, stop retrying.
            write(read().map((p) => (p.clientRef === entry.clientRef ? { ...p, attempts: -1, lastError } : p)));
          } else {
            write(read().map((p) => (p.clientRef === entry.clientRef ? { ...p, attempts: p.attempts + 1, lastError } : p)));
            break;
          }
        }
      }
    } finally {
      flushing = false;
    }
  }, [qc, userId]);
}

/** Keeps trying the send queue while the app is open: on a timer and whenever the browser is back online. */
export function useSendQueueSender(intervalMs = 15_000) {
  const flush = useSendQueueFlush();
  useEffect(() => {
    const timer = setInterval(() => void flush(), intervalMs);
    const online = () => void flush();
    if (typeof window !== 'undefined') window.addEventListener('online', online);
    void flush();
    return () => {
      clearInterval(timer);
      if (typeof window !== 'undefined') window.removeEventListener('online', online);
    };
  }, [flush, intervalMs]);
}
