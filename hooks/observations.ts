import { infiniteQueryOptions, queryOptions, useInfiniteQuery, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';

import {
  observationDetailSchema,
  observationPageSchema,
  observationSchema,
  revisionSchema,
  type FindInput,
  type IdentificationInput,
  type ObservationCreate,
  type ObservationUpdate,
  type VerificationInput,
} from '@/lib/schemas';
import { ApiError, request } from './api';
import { afterEntryChanged, afterEntryRetired } from './cache-effects';
import { campaignKeys, observationKeys, type DiveLogFilters } from './query-keys';

export { observationKeys, type DiveLogFilters };

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

export function useCreateObservation(diveId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: ObservationCreate) =>
      request(`/api/dives/${encodeURIComponent(diveId)}/observations`, observationSchema, { body: input }),
    onSuccess: (created) => {
      afterEntryChanged(qc, created);
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
      afterEntryChanged(qc, updated);
    },
  });
}

/** Retires any entry by its id (the undo of a quick mark names the entry it just logged). */
export function useRetireEntry() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => request(`/api/observations/${encodeURIComponent(id)}`, observationDetailSchema, { method: 'DELETE' }),
    onSuccess: (retired) => {
      qc.setQueryData(observationKeys.detail(retired.id), retired);
      afterEntryRetired(qc, retired);
    },
  });
}

export function useRestoreObservation(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => request(`/api/observations/${encodeURIComponent(id)}/restore`, observationDetailSchema, { body: {} }),
    onSuccess: (restored) => {
      qc.setQueryData(observationKeys.detail(id), restored);
      afterEntryChanged(qc, restored);
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
      afterEntryChanged(qc, detail);
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
    queryKey: campaignKeys.nextFindNumber(campaignId),
    queryFn: () => request(`/api/campaigns/${encodeURIComponent(campaignId)}/finds/next-number`, z.object({ findNumber: z.string() })),
    staleTime: 0,
  });
