import { useQueryClient, type QueryClient } from '@tanstack/react-query';
import { useCallback, useEffect, useRef, useState } from 'react';
import { z } from 'zod';

import { diveSchema, observationSchema, type Observation } from '@/lib/schemas';
import { ApiError, apiUrl, request } from './api';
import {
  afterDiveChanged,
  afterDiveResync,
  afterEntryChanged,
  afterEntryRetired,
  afterTelemetryImported,
  isInDiveLogs,
  mergeIntoDiveLogs,
} from './cache-effects';
import { sessionKeys, telemetryKeys, watchKeys } from './query-keys';

export type LiveStatus = 'connecting' | 'live' | 'offline';

const retiredSchema = z.object({ id: z.string(), diveId: z.string() });

function parse<S extends z.ZodType>(schema: S, data: string): z.output<S> | undefined {
  try {
    const r = schema.safeParse(JSON.parse(data));
    return r.success ? r.data : undefined;
  } catch {
    return undefined;
  }
}

/** What one screen following a dive wants to hear, beyond the cache updates every follower gets. */
type Follower = {
  /** True while the reader is scrolled away from the top: new entries wait instead of moving the list. */
  holding?: () => boolean;
  hold?: (o: Observation) => void;
  onUpdated?: (o: Observation) => void;
  onRetired?: (id: string) => void;
  onStatus: (s: LiveStatus) => void;
};

type Connection = { followers: Set<Follower>; status: LiveStatus; close: () => void };

/** One stream per dive however many screens follow it (the log, an entry opened over it, the gallery). */
const connections = new WeakMap<QueryClient, Map<string, Connection>>();

/** The dive's summary counts entries and marks them on its profile: fetched again once a burst of changes settles. */
const SUMMARY_SETTLE_MS = 1000;
/** A stream the server (or a proxy) refused is opened again after 2 s, then 4, 8 … at most a minute apart. */
const RETRY_FIRST_MS = 2000;
const RETRY_MAX_MS = 60_000;

function connect(qc: QueryClient, diveId: string, followers: Set<Follower>): Connection {
  const connection: Connection = { followers, status: 'connecting', close: () => {} };
  const setStatus = (s: LiveStatus) => {
    connection.status = s;
    for (const f of followers) f.onStatus(s);
  };
  // The browser reconnects a dropped stream by itself, but gives up for good when an answer is not
  // the stream (a proxy's 502, a 429): then it is opened again here, later and later, from the
  // last event it saw. Unless the dive itself is now refused: signed out (401), or no longer a
  // member (403, 404), where the stream stays closed.
  let source: EventSource | undefined;
  let lastEventId: string | undefined;
  let retryTimer: ReturnType<typeof setTimeout> | undefined;
  let retryMs = RETRY_FIRST_MS;
  let closed = false;
  const handlers: [string, (data: string) => void][] = [];
  const on = (type: string, handle: (data: string) => void) => handlers.push([type, handle]);
  const retry = () => {
    if (closed) return;
    setStatus('connecting');
    retryTimer = setTimeout(open, retryMs);
    retryMs = Math.min(retryMs * 2, RETRY_MAX_MS);
  };
  const open = () => {
    const since = lastEventId ? `?lastEventId=${encodeURIComponent(lastEventId)}` : '';
    const s = new EventSource(apiUrl(`/api/dives/${encodeURIComponent(diveId)}/stream${since}`), { withCredentials: true });
    source = s;
    s.onopen = () => {
      retryMs = RETRY_FIRST_MS;
      setStatus('live');
    };
    s.onerror = () => {
      if (s.readyState !== EventSource.CLOSED) return setStatus('connecting');
      if (closed) return;
      void request(`/api/dives/${encodeURIComponent(diveId)}`, z.unknown()).then(
        () => retry(),
        (err: unknown) => {
          const status = err instanceof ApiError ? err.status : 0;
          if (status === 401) void qc.invalidateQueries({ queryKey: sessionKeys.me() });
          if (status === 401 || status === 403 || status === 404) setStatus('offline');
          else retry();
        },
      );
    };
    for (const [type, handle] of handlers) {
      s.addEventListener(type, (e) => {
        const m = e as MessageEvent<string>;
        if (m.lastEventId) lastEventId = m.lastEventId;
        handle(m.data);
      });
    }
  };
  let summaryTimer: ReturnType<typeof setTimeout> | undefined;
  const summaryChanged = () => {
    clearTimeout(summaryTimer);
    summaryTimer = setTimeout(() => void qc.invalidateQueries({ queryKey: telemetryKeys.summary(diveId) }), SUMMARY_SETTLE_MS);
  };
  const holder = () => [...followers].find((f) => f.holding?.());

  // Changes between loading a screen and opening the stream (or more than the server replays):
  // fetch everything shown of the dive again once.
  const refetchAll = () => afterDiveResync(qc, diveId);
  on('ready', refetchAll);
  on('resync', refetchAll);
  // The server closed this stream to make room for a newer one of the same person (another tab):
  // reconnecting would only close that one in turn, so this one stays closed.
  on('stream.closed', () => {
    source?.close();
    setStatus('offline');
  });
  // A new entry, or one a lead restored, appears in the log: at once, or held back while the
  // reader is scrolled away from the top.
  const appeared = (data: string) => {
    const o = parse(observationSchema, data);
    if (!o) return;
    summaryChanged();
    const h = isInDiveLogs(qc, o) ? undefined : holder();
    if (h) h.hold?.(o);
    afterEntryChanged(qc, o, { origin: 'stream', merge: !h });
  };
  on('observation.created', appeared);
  on('observation.restored', appeared);
  on('observation.updated', (data) => {
    const o = parse(observationSchema, data);
    if (!o) return;
    summaryChanged();
    for (const f of followers) f.onUpdated?.(o);
    afterEntryChanged(qc, o, { origin: 'stream', merge: isInDiveLogs(qc, o) || !holder() });
  });
  on('observation.retired', (data) => {
    const r = parse(retiredSchema, data);
    if (!r) return;
    summaryChanged();
    for (const f of followers) f.onRetired?.(r.id);
    afterEntryRetired(qc, r, 'stream');
  });
  // A telemetry log stamped the dive's entries again: one event however many changed, and what
  // is shown of the dive is fetched again.
  on('dive.restamped', () => {
    summaryChanged();
    void afterTelemetryImported(qc, diveId);
  });
  // A handover note was written at a change of watch, or acknowledged: the campaign's notes, and
  // who is on watch now, are fetched again rather than waiting for their minute's refetch.
  const handoverChanged = () => void qc.invalidateQueries({ queryKey: watchKeys.root });
  on('handover.written', handoverChanged);
  on('handover.acknowledged', handoverChanged);
  on('dive.updated', (data) => {
    const dive = parse(diveSchema, data);
    if (dive && dive.id === diveId) afterDiveChanged(qc, dive);
  });
  open();
  connection.close = () => {
    closed = true;
    clearTimeout(summaryTimer);
    clearTimeout(retryTimer);
    source?.close();
  };
  return connection;
}

/** Joins the dive's stream (opening it if this is its first follower); gives the leave function. */
function follow(qc: QueryClient, diveId: string, follower: Follower): () => void {
  let byDive = connections.get(qc);
  if (!byDive) connections.set(qc, (byDive = new Map<string, Connection>()));
  let connection = byDive.get(diveId);
  if (!connection) {
    connection = connect(qc, diveId, new Set());
    byDive.set(diveId, connection);
  }
  connection.followers.add(follower);
  follower.onStatus(connection.status);
  const joined = connection;
  return () => {
    joined.followers.delete(follower);
    if (joined.followers.size > 0) return;
    joined.close();
    if (byDive.get(diveId) === joined) byDive.delete(diveId);
  };
}

/**
 * Keeps what a screen shows of a dive live (an entry, the gallery, the summary) when it was opened
 * straight from a link rather than over the dive's log; shares the log's stream when that is open.
 */
export function useFollowDive(diveId: string | undefined): LiveStatus {
  const qc = useQueryClient();
  const supported = typeof EventSource !== 'undefined';
  const [status, setStatus] = useState<LiveStatus>(supported ? 'connecting' : 'offline');
  useEffect(() => {
    if (!diveId || !supported) return;
    return follow(qc, diveId, { onStatus: setStatus });
  }, [diveId, qc, supported]);
  return status;
}

/**
 * Follows a dive's live stream and merges what happens into the cached dive log. While the
 * reader is scrolled away from the top, new entries are held back (`held`) instead of pushing
 * the list down under their finger; `showHeld` lets them in.
 */
export function useDiveLive(diveId: string | undefined, holdNew: () => boolean) {
  const qc = useQueryClient();
  const supported = typeof EventSource !== 'undefined';
  const [status, setStatus] = useState<LiveStatus>(supported ? 'connecting' : 'offline');
  const [held, setHeld] = useState<Observation[]>([]);
  const hold = useRef(holdNew);
  useEffect(() => {
    hold.current = holdNew;
  });

  useEffect(() => {
    if (!diveId || !supported) return;
    return follow(qc, diveId, {
      onStatus: setStatus,
      holding: () => hold.current(),
      hold: (o) => setHeld((h) => [...h.filter((x) => x.id !== o.id), o]),
      onUpdated: (o) => setHeld((h) => h.map((x) => (x.id === o.id ? o : x))),
      onRetired: (id) => setHeld((h) => h.filter((x) => x.id !== id)),
    });
  }, [diveId, qc, supported]);

  const showHeld = useCallback(() => {
    setHeld((h) => {
      for (const o of h) mergeIntoDiveLogs(qc, o);
      return [];
    });
  }, [qc]);

  return { status, held, showHeld };
}
