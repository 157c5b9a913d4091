/**
 * The last answers this device saw, kept in the browser so the app opens with no link: TanStack
 * Query's persister writes the query cache to localStorage (throttled) and puts it back at start.
 * One copy for the one person signed in here: signing out empties it (useSignOut), and a start that
 * finds nobody signed in empties it too, so nothing of one person's is ever shown to another.
 */
import { createSyncStoragePersister } from '@tanstack/query-sync-storage-persister';
import { onlineManager, type QueryClient } from '@tanstack/react-query';
import type { PersistQueryClientOptions } from '@tanstack/react-query-persist-client';
import { useEffect, useSyncExternalStore } from 'react';

import { useMe } from './session';
import { sessionKeys } from './query-keys';

/** A week: a guest ashore opens the app the next day and still sees the dive as it was. */
const MAX_AGE_MS = 7 * 24 * 3600 * 1000;

function browserStorage(): Storage | undefined {
  try {
    return typeof window !== 'undefined' ? window.localStorage : undefined;
  } catch {
    // Private modes may refuse storage: the app then simply starts empty.
    return undefined;
  }
}

export function offlineCacheOptions(): Omit<PersistQueryClientOptions, 'queryClient'> {
  return {
    persister: createSyncStoragePersister({ storage: browserStorage(), key: 'bathynote.query-cache', throttleTime: 1000 }),
    maxAge: MAX_AGE_MS,
    dehydrateOptions: { shouldDehydrateQuery: (q) => q.state.status === 'success' },
  };
}

/**
 * After the cache is back: with a link, who is signed in is asked again before any screen shows
 * (the kept answer might be someone else's, signed out elsewhere), and every kept answer is asked
 * again behind the screen that shows it (an ETag makes an unchanged one cost a 304); with no link,
 * the kept answers stand.
 */
export function afterRestore(qc: QueryClient) {
  if (typeof navigator !== 'undefined') onlineManager.setOnline(navigator.onLine);
  if (!onlineManager.isOnline()) return;
  void qc.resetQueries({ queryKey: sessionKeys.me() });
  void qc.invalidateQueries({ predicate: (q) => q.queryKey[0] !== sessionKeys.root[0] });
}

/** Nobody signed in: nothing of anyone's stays in the cache (nor, through the persister, on the device). */
export function useForgetWhenSignedOut(qc: QueryClient) {
  const me = useMe();
  const signedOut = me.data === null;
  useEffect(() => {
    if (signedOut) qc.removeQueries({ predicate: (q) => q.queryKey[0] !== sessionKeys.root[0] });
  }, [signedOut, qc]);
}

export function useOnline(): boolean {
  return useSyncExternalStore(
    (l) => onlineManager.subscribe(l),
    () => onlineManager.isOnline(),
    () => true,
  );
}

/** When the newest answer on screen arrived: what "showing what was here at …" names. */
export function lastAnswerAt(qc: QueryClient): number | null {
  let latest = 0;
  for (const q of qc.getQueryCache().getAll()) if (q.state.status === 'success') latest = Math.max(latest, q.state.dataUpdatedAt);
  return latest > 0 ? latest : null;
}
