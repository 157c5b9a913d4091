import {
  infiniteQueryOptions,
  queryOptions,
  useInfiniteQuery,
  useMutation,
  useQuery,
  useQueryClient,
  type InfiniteData,
  type QueryClient,
} from '@tanstack/react-query';
import { z } from 'zod';

import {
  observationDetailSchema,
  observationPageSchema,
  observationSchema,
  revisionSchema,
  type FindInput,
  type IdentificationInput,
  type Observation,
  type ObservationCreate,
  type ObservationPage,
  type ObservationUpdate,
  type VerificationInput,
} from '@/lib/schemas';
import { ApiError, request } from './api';
import { campaignKeys } from './campaigns';
import { diveKeys } from './dives';

export type DiveLogFilters = {
  kind?: string;
  tag?: string;
  author?: string;
  hasPhotos?: 'true' | 'false';
  verification?: string;
  /** Only the retired entries, which the server shows to leads alone. */
  retired?: 'only';
  sort?: 'time' | 'depth' | 'kind' | 'author';
  order?: 'asc' | 'desc';
};

export const observationKeys = {
  root: ['observations'] as const,
  diveLogs: (diveId: string) => [...observationKeys.root, 'dive-log', diveId] as const,
  diveLog: (diveId: string, filters: DiveLogFilters = {}) => [...observationKeys.diveLogs(diveId), filters] as const,
  detail: (id: string) => [...observationKeys.root, 'detail', id] as const,
  revisions: (id: string) => [...observationKeys.root, 'detail', id, 'revisions'] as const,
};

function query(params: Record<string, string | undefined | null>): string {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v) q.set(k, v);
  return q.toString();
}

export const diveLogQuery = (diveId: string, filters: DiveLogFilters = {}) =>
  infiniteQueryOptions({
    queryKey: observationKeys.diveLog(diveId, filters),
    queryFn: ({ pageParam, signal }) =>
      request(
        `/api/dives/${encodeURIComponent(diveId)}/observations?${query({ limit: '50', cursor: pageParam, ...filters })}`,
        observationPageSchema,
        {
          signal,
        },
      ),
    initialPageParam: null as string | null,
    getNextPageParam: (last) => last.nextCursor,
  });

export const observationQuery = (id: string) =>
  queryOptions({
    queryKey: observationKeys.detail(id),
    queryFn: () => request(`/api/observations/${encodeURIComponent(id)}`, observationDetailSchema),
  });

export const revisionsQuery = (id: string) =>
  queryOptions({
    queryKey: observationKeys.revisions(id),
    queryFn: () => request(`/api/observations/${encodeURIComponent(id)}/revisions`, z.array(revisionSchema)),
  });

export const useDiveLog = (diveId: string | undefined, filters: DiveLogFilters = {}) =>
  useInfiniteQuery({ ...diveLogQuery(diveId ?? '', filters), enabled: !!diveId });
export const useObservation = (id: string | undefined) => useQuery({ ...observationQuery(id ?? ''), enabled: !!id });
export const useRevisions = (id: string, enabled: boolean) => useQuery({ ...revisionsQuery(id), enabled });

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

/** After any change to an entry: the detail, its history and the logs it appears in. */
function settle(qc: QueryClient, o: Observation) {
  mergeIntoDiveLogs(qc, o);
  void qc.invalidateQueries({ queryKey: observationKeys.detail(o.id) });
  void qc.invalidateQueries({ queryKey: diveKeys.detail(o.diveId) });
  void qc.invalidateQueries({ queryKey: campaignKeys.tags(o.campaignId) });
}

export function useCreateObservation(diveId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: ObservationCreate) =>
      request(`/api/dives/${encodeURIComponent(diveId)}/observations`, observationSchema, { body: input }),
    onSuccess: (created) => {
      settle(qc, created);
      void qc.invalidateQueries({ queryKey: campaignKeys.dives(created.campaignId) });
    },
  });
}

export function useUpdateObservation(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: ObservationUpdate) =>
      request(`/api/observations/${encodeURIComponent(id)}`, observationDetailSchema, { method: 'PATCH', body: input }),
    onSuccess: (updated) => {
      qc.setQueryData(observationKeys.detail(id), updated);
      settle(qc, updated);
    },
  });
}

export function useRetireObservation(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => request(`/api/observations/${encodeURIComponent(id)}`, observationDetailSchema, { method: 'DELETE' }),
    onSuccess: (retired) => {
      qc.setQueryData(observationKeys.detail(id), retired);
      mergeIntoDiveLogs(qc, retired, true);
      void qc.invalidateQueries({ queryKey: diveKeys.detail(retired.diveId) });
    },
  });
}

export function useRestoreObservation(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => request(`/api/observations/${encodeURIComponent(id)}/restore`, observationDetailSchema, { body: {} }),
    onSuccess: (restored) => {
      qc.setQueryData(observationKeys.detail(id), restored);
      settle(qc, restored);
    },
  });
}

function useDetailMutation<I>(id: string, path: string, method: 'PUT' | 'POST') {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: I) =>
      request(`/api/observations/${encodeURIComponent(id)}/${path}`, observationDetailSchema, { method, body: input }),
    onSuccess: (detail) => {
      qc.setQueryData(observationKeys.detail(id), detail);
      settle(qc, detail);
    },
    onError: (err) => {
      // Refused as stale: fetching the entry again brings the other person's version into view.
      if (err instanceof ApiError && err.code === 'stale_version') void qc.invalidateQueries({ queryKey: observationKeys.detail(id) });
    },
  });
}

export const useSetIdentification = (id: string) => useDetailMutation<IdentificationInput>(id, 'identification', 'PUT');
export const useVerifyIdentification = (id: string) => useDetailMutation<VerificationInput>(id, 'identification/verify', 'POST');
export const useSetFind = (id: string) => useDetailMutation<FindInput>(id, 'find', 'PUT');
export const useAddCustody = (id: string) =>
  useDetailMutation<{ holder: string; since: string; location: string; container?: string | null; note?: string | null }>(
    id,
    'custody',
    'POST',
  );

export const nextFindNumberQuery = (campaignId: string) =>
  queryOptions({
    queryKey: [...campaignKeys.detail(campaignId), 'next-find-number'] as const,
    queryFn: () => request(`/api/campaigns/${encodeURIComponent(campaignId)}/finds/next-number`, z.object({ findNumber: z.string() })),
    staleTime: 0,
  });
