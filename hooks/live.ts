import { useQueryClient, type InfiniteData, type QueryClient } from '@tanstack/react-query';
import { useCallback, useEffect, useRef, useState } from 'react';
import { z } from 'zod';

import { diveSchema, observationSchema, type Observation, type ObservationPage } from '@/lib/schemas';
import { apiUrl } from './api';
import { diveKeys } from './dives';
import { photoKeys } from './photos';
import { mergeIntoDiveLogs, observationKeys } from './observations';

export type LiveStatus = 'connecting' | 'live' | 'offline';

const retiredSchema = z.object({ id: z.string(), diveId: z.string() });

function inCache(qc: QueryClient, o: Observation): boolean {
  return qc
    .getQueriesData<InfiniteData<ObservationPage>>({ queryKey: observationKeys.diveLogs(o.diveId) })
    .some(([, data]) => data?.pages.some((p) => p.items.some((i) => i.id === o.id)));
}

function parse<S extends z.ZodType>(schema: S, data: string): z.output<S> | undefined {
  try {
    const r = schema.safeParse(JSON.parse(data));
    return r.success ? r.data : undefined;
  } catch {
    return undefined;
  }
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
    const source = new EventSource(apiUrl(`/api/dives/${encodeURIComponent(diveId)}/stream`), { withCredentials: true });
    source.onopen = () => setStatus('live');
    source.onerror = () => setStatus(source.readyState === EventSource.CLOSED ? 'offline' : 'connecting');
    const on = (type: string, handle: (data: string) => void) =>
      source.addEventListener(type, (e) => handle((e as MessageEvent<string>).data));

    // Entries logged between loading the list and opening the stream: fetch the list again once.
    on('ready', () => void qc.invalidateQueries({ queryKey: observationKeys.diveLogs(diveId) }));
    on('resync', () => void qc.invalidateQueries({ queryKey: observationKeys.diveLogs(diveId) }));
    on('observation.created', (data) => {
      const o = parse(observationSchema, data);
      if (!o) return;
      if (hold.current() && !inCache(qc, o)) setHeld((h) => [...h.filter((x) => x.id !== o.id), o]);
      else mergeIntoDiveLogs(qc, o);
    });
    on('observation.updated', (data) => {
      const o = parse(observationSchema, data);
      if (!o) return;
      setHeld((h) => h.map((x) => (x.id === o.id ? o : x)));
      if (inCache(qc, o) || !hold.current()) mergeIntoDiveLogs(qc, o);
      void qc.invalidateQueries({ queryKey: observationKeys.detail(o.id) });
      // The entry's photos may be what changed (added, captioned, moved, retired): the detail above
      // fetches them again, and so does an open gallery of the dive.
      void qc.invalidateQueries({ queryKey: photoKeys.galleries(o.diveId) });
    });
    on('observation.retired', (data) => {
      const r = parse(retiredSchema, data);
      if (!r) return;
      setHeld((h) => h.filter((x) => x.id !== r.id));
      for (const [key, log] of qc.getQueriesData<InfiniteData<ObservationPage>>({ queryKey: observationKeys.diveLogs(r.diveId) })) {
        if (log) qc.setQueryData(key, { ...log, pages: log.pages.map((p) => ({ ...p, items: p.items.filter((i) => i.id !== r.id) })) });
      }
      void qc.invalidateQueries({ queryKey: observationKeys.detail(r.id) });
    });
    on('dive.updated', (data) => {
      const dive = parse(diveSchema, data);
      if (dive && dive.id === diveId) qc.setQueryData(diveKeys.detail(diveId), dive);
    });
    return () => source.close();
  }, [diveId, qc, supported]);

  const showHeld = useCallback(() => {
    setHeld((h) => {
      for (const o of h) mergeIntoDiveLogs(qc, o);
      return [];
    });
  }, [qc]);

  return { status, held, showHeld };
}
