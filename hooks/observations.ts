import { infiniteQueryOptions, queryOptions, useInfiniteQuery, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';

import { observationDetailSchema, observationPageSchema, observationSchema, type ObservationCreate } from '@/lib/schemas';
import { request } from './api';
import { campaignKeys } from './campaigns';
import { diveKeys } from './dives';

export const observationKeys = {
  root: ['observations'] as const,
  diveLog: (diveId: string) => [...observationKeys.root, 'dive-log', diveId] as const,
  detail: (id: string) => [...observationKeys.root, 'detail', id] as const,
};

export const diveLogQuery = (diveId: string) =>
  infiniteQueryOptions({
    queryKey: observationKeys.diveLog(diveId),
    queryFn: ({ pageParam, signal }) =>
      request(
        `/api/dives/${encodeURIComponent(diveId)}/observations?limit=50${pageParam ? `&cursor=${encodeURIComponent(pageParam)}` : ''}`,
        observationPageSchema,
        { signal },
      ),
    initialPageParam: null as string | null,
    getNextPageParam: (last) => last.nextCursor,
  });

export const observationQuery = (id: string) =>
  queryOptions({
    queryKey: observationKeys.detail(id),
    queryFn: () => request(`/api/observations/${encodeURIComponent(id)}`, observationDetailSchema),
  });

export const useDiveLog = (diveId: string | undefined) => useInfiniteQuery({ ...diveLogQuery(diveId ?? ''), enabled: !!diveId });
export const useObservation = (id: string | undefined) => useQuery({ ...observationQuery(id ?? ''), enabled: !!id });

export function useCreateObservation(diveId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: ObservationCreate) =>
      request(`/api/dives/${encodeURIComponent(diveId)}/observations`, observationSchema, { body: input }),
    onSuccess: async (created) => {
      await Promise.all([
        qc.invalidateQueries({ queryKey: observationKeys.diveLog(diveId) }),
        qc.invalidateQueries({ queryKey: diveKeys.detail(diveId) }),
        qc.invalidateQueries({ queryKey: campaignKeys.dives(created.campaignId) }),
        qc.invalidateQueries({ queryKey: campaignKeys.tags(created.campaignId) }),
      ]);
    },
  });
}
