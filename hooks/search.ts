import { infiniteQueryOptions, keepPreviousData, useInfiniteQuery } from '@tanstack/react-query';
import { useCallback, useEffect, useState } from 'react';

import { searchPageSchema } from '@/lib/schemas/search';
import { request } from './api';
import { searchKeys, type SearchFilters } from './query-keys';
import { storage } from './storage';

export { searchKeys, type SearchFilters };

/** The filter names a search URL may carry, in the order the chips show them. */
export const searchFilterNames = [
  'campaignId',
  'diveId',
  'kind',
  'tag',
  'author',
  'hasPhotos',
  'verification',
  'minDepth',
  'maxDepth',
  'from',
  'to',
] as const satisfies readonly (keyof SearchFilters)[];

/** The filters present in a set of URL parameters (empty ones left out, so cache keys stay equal). */
export function filtersFromParams(params: Record<string, string | string[] | undefined>): SearchFilters {
  const out: Record<string, string> = {};
  for (const name of searchFilterNames) {
    const v = params[name];
    const value = Array.isArray(v) ? v[0] : v;
    if (value) out[name] = value;
  }
  return out;
}

export const searchQuery = (q: string, filters: SearchFilters) =>
  infiniteQueryOptions({
    queryKey: searchKeys.results(q, filters),
    queryFn: ({ pageParam, signal }) => {
      const params = new URLSearchParams({ q, limit: '20', ...filters });
      if (pageParam) params.set('cursor', pageParam);
      return request(`/api/search?${params.toString()}`, searchPageSchema, { signal });
    },
    initialPageParam: null as string | null,
    getNextPageParam: (last) => last.nextCursor,
  });

/** Results for a query; nothing is asked while the query is blank. The last results stay shown while the next load. */
export const useSearch = (q: string, filters: SearchFilters) =>
  useInfiniteQuery({ ...searchQuery(q, filters), enabled: q.trim() !== '', placeholderData: keepPreviousData, staleTime: 10_000 });

/** A value that follows another after it has stopped changing for `ms`. */
export function useDebounced<T>(value: T, ms = 250): T {
  const [settled, setSettled] = useState(value);
  useEffect(() => {
    const timer = setTimeout(() => setSettled(value), ms);
    return () => clearTimeout(timer);
  }, [value, ms]);
  return settled;
}

const RECENT_MAX = 8;

function readRecent(key: string | null): string[] {
  if (!key) return [];
  try {
    const parsed: unknown = JSON.parse(storage.get(key) ?? '[]');
    return Array.isArray(parsed) ? parsed.filter((s): s is string => typeof s === 'string').slice(0, RECENT_MAX) : [];
  } catch {
    // A damaged entry is simply forgotten.
    return [];
  }
}

/** The last searches of one person on this device, newest first (kept apart per user). */
export function useRecentSearches(userId: string | undefined) {
  const key = userId ? `bathynote.recent-searches.${userId}` : null;
  const [kept, setKept] = useState(() => ({ key, list: readRecent(key) }));
  // Another person signed in on this device: their own list.
  const recent = kept.key === key ? kept.list : readRecent(key);

  const remember = useCallback(
    (q: string) => {
      const text = q.trim();
      if (!key || text.length < 2) return;
      const next = [text, ...readRecent(key).filter((s) => s.toLowerCase() !== text.toLowerCase())].slice(0, RECENT_MAX);
      storage.set(key, JSON.stringify(next));
      setKept({ key, list: next });
    },
    [key],
  );
  const clear = useCallback(() => {
    if (key) storage.remove(key);
    setKept({ key, list: [] });
  }, [key]);
  return { recent, remember, clear };
}
