/**
 * What a change does to the cached queries, in one place: the mutations call these after their own
 * changes, and the live stream after someone else's, so a change reads the same on every screen
 * whichever way it arrived.
 */
import type { InfiniteData, QueryClient } from '@tanstack/react-query';

import type { Dive, Observation, ObservationPage } from '@/lib/schemas';
import { campaignKeys, diveKeys, observationKeys, photoKeys, telemetryKeys, type DiveLogFilters } from './query-keys';

/**
 * Where a change came from. One's own change also refreshes the dive's counts and the campaign's
 * tag vocabulary; a change seen on the stream leaves them to the stream's own `dive.updated`, so a
 * busy dive does not make every reader fetch them again on every event.
 */
export type ChangeOrigin = 'here' | 'stream';

type LogData = InfiniteData<ObservationPage, string | null>;

/** Newest first, as the server sorts: by time, then by id. */
const newer = (a: Observation, b: Observation) => a.observedAt > b.observedAt || (a.observedAt === b.observedAt && a.id > b.id);

/** Puts an entry where it belongs among loaded pages; an entry older than all of them waits for its page. */
function insertByTime(pages: ObservationPage[], o: Observation, allLoaded: boolean) {
  for (const page of pages) {
    const i = page.items.findIndex((x) => newer(o, x));
    if (i >= 0) {
      page.items.splice(i, 0, o);
      return;
    }
  }
  if (allLoaded) pages[pages.length - 1]?.items.push(o);
}

/**
 * Puts an entry into the dive logs already in the cache (or takes it out), so a change seen live
 * or made here shows at once without refetching every page. Filtered or re-sorted logs are
 * refetched instead: only the server knows where the entry falls in them.
 */
export function mergeIntoDiveLogs(qc: QueryClient, o: Observation, remove = false) {
  for (const [key, data] of qc.getQueriesData<LogData>({ queryKey: observationKeys.diveLogs(o.diveId) })) {
    if (!data) continue;
    const filters = (key[3] ?? {}) as DiveLogFilters;
    const plain = Object.entries(filters).every(
      ([k, v]) => v === undefined || (k === 'sort' && v === 'time') || (k === 'order' && v === 'desc'),
    );
    if (!plain) {
      void qc.invalidateQueries({ queryKey: key, exact: true });
      continue;
    }
    const pages = data.pages.map((p) => ({ ...p, items: p.items.filter((i) => i.id !== o.id) }));
    if (!remove && !o.retired) insertByTime(pages, o, !data.pages[data.pages.length - 1]?.nextCursor);
    qc.setQueryData<LogData>(key, { ...data, pages });
  }
}

/** Whether a loaded page of the entry's dive log already holds it. */
export function isInDiveLogs(qc: QueryClient, o: Pick<Observation, 'id' | 'diveId'>): boolean {
  return qc
    .getQueriesData<LogData>({ queryKey: observationKeys.diveLogs(o.diveId) })
    .some(([, data]) => data?.pages.some((p) => p.items.some((i) => i.id === o.id)));
}

/**
 * An entry was logged, edited, restored, identified or registered as a find: the logs it appears
 * in, its detail and the galleries that filter by its kind and tags. `merge: false` leaves the
 * logs alone (the stream holds a new entry back while the reader is scrolled away).
 */
export function afterEntryChanged(qc: QueryClient, o: Observation, options: { origin?: ChangeOrigin; merge?: boolean } = {}) {
  const { origin = 'here', merge = true } = options;
  if (merge) mergeIntoDiveLogs(qc, o);
  void qc.invalidateQueries({ queryKey: observationKeys.detail(o.id) });
  void qc.invalidateQueries({ queryKey: photoKeys.galleries(o.diveId) });
  if (origin === 'here') {
    void qc.invalidateQueries({ queryKey: diveKeys.detail(o.diveId) });
    void qc.invalidateQueries({ queryKey: campaignKeys.tags(o.campaignId) });
  }
}

/** An entry was retired: out of every plain log at once, its detail fetched again (leads still see it). */
export function afterEntryRetired(qc: QueryClient, o: Pick<Observation, 'id' | 'diveId'>, origin: ChangeOrigin = 'here') {
  for (const [key, log] of qc.getQueriesData<LogData>({ queryKey: observationKeys.diveLogs(o.diveId) })) {
    if (log) qc.setQueryData(key, { ...log, pages: log.pages.map((p) => ({ ...p, items: p.items.filter((i) => i.id !== o.id) })) });
  }
  void qc.invalidateQueries({ queryKey: observationKeys.detail(o.id) });
  void qc.invalidateQueries({ queryKey: photoKeys.galleries(o.diveId) });
  if (origin === 'here') void qc.invalidateQueries({ queryKey: diveKeys.detail(o.diveId) });
}

/** An entry's photos changed (added, captioned, retired): its detail, its card's count, the galleries, the dive. */
export function afterPhotosChanged(qc: QueryClient, o: Pick<Observation, 'id' | 'diveId'>) {
  return Promise.all([
    qc.invalidateQueries({ queryKey: observationKeys.detail(o.id) }),
    qc.invalidateQueries({ queryKey: observationKeys.diveLogs(o.diveId) }),
    qc.invalidateQueries({ queryKey: photoKeys.galleries(o.diveId) }),
    qc.invalidateQueries({ queryKey: diveKeys.detail(o.diveId) }),
  ]);
}

/** A dive changed (planned, a phase, its recording clock): its detail, the campaign's list, the summary. */
export function afterDiveChanged(qc: QueryClient, dive: Dive) {
  qc.setQueryData(diveKeys.detail(dive.id), dive);
  void qc.invalidateQueries({ queryKey: campaignKeys.dives(dive.campaignId) });
  // Phases, the video clock and the gap setting all change what the summary says.
  void qc.invalidateQueries({ queryKey: telemetryKeys.summary(dive.id) });
}

/** A telemetry log was imported: the charts, and every entry, which the import stamps again. */
export function afterTelemetryImported(qc: QueryClient, diveId: string) {
  return Promise.all([
    qc.invalidateQueries({ queryKey: telemetryKeys.dive(diveId) }),
    qc.invalidateQueries({ queryKey: observationKeys.root }),
    qc.invalidateQueries({ queryKey: diveKeys.detail(diveId) }),
  ]);
}

/** Everything shown of a dive, fetched again once (the stream missed changes, or more than it replays). */
export function afterDiveResync(qc: QueryClient, diveId: string) {
  void qc.invalidateQueries({ queryKey: observationKeys.diveLogs(diveId) });
  void qc.invalidateQueries({
    predicate: (q) =>
      q.queryKey[0] === observationKeys.root[0] &&
      q.queryKey[1] === 'detail' &&
      (q.state.data as { diveId?: string } | undefined)?.diveId === diveId,
  });
  void qc.invalidateQueries({ queryKey: diveKeys.detail(diveId) });
  void qc.invalidateQueries({ queryKey: photoKeys.galleries(diveId) });
  void qc.invalidateQueries({ queryKey: telemetryKeys.summary(diveId) });
}
