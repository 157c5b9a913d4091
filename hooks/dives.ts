import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';

import { diveSchema, type DivePhase } from '@/lib/schemas';
import { request } from './api';
import { afterDiveChanged } from './cache-effects';
import { diveKeys } from './query-keys';

export { diveKeys };

export const diveQuery = (id: string) =>
  queryOptions({ queryKey: diveKeys.detail(id), queryFn: () => request(`/api/dives/${encodeURIComponent(id)}`, diveSchema) });

export const useDive = (id: string | undefined) => useQuery({ ...diveQuery(id ?? ''), enabled: !!id });

function useDiveMutation<I>(diveId: string, path: string, method: 'POST' | 'PATCH') {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: I) => request(`/api/dives/${encodeURIComponent(diveId)}${path}`, diveSchema, { method, body: input }),
    onSuccess: (dive) => afterDiveChanged(qc, dive),
  });
}

export const useSetPhase = (diveId: string) => useDiveMutation<{ phase: DivePhase; at?: string | null }>(diveId, '/phases', 'POST');

export const useUpdateDive = (diveId: string) =>
  useDiveMutation<{
    version: number;
    recordingStartAt?: string | null;
    frameRate?: string | null;
    telemetryGapS?: number;
    objectives?: string;
  }>(diveId, '', 'PATCH');
