import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';

import { diveSchema, type DivePhase } from '@/lib/schemas';
import { request } from './api';
import { campaignKeys } from './campaigns';
import { telemetryKeys } from './telemetry';

export const diveKeys = {
  root: ['dives'] as const,
  detail: (id: string) => [...diveKeys.root, id] as const,
};

export const diveQuery = (id: string) =>
  queryOptions({ queryKey: diveKeys.detail(id), queryFn: () => request(`/api/dives/${encodeURIComponent(id)}`, diveSchema) });

export const useDive = (id: string | undefined) => useQuery({ ...diveQuery(id ?? ''), enabled: !!id });

function useDiveMutation<I>(diveId: string, path: string, method: 'POST' | 'PATCH') {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: I) => request(`/api/dives/${encodeURIComponent(diveId)}${path}`, diveSchema, { method, body: input }),
    onSuccess: (dive) => {
      qc.setQueryData(diveKeys.detail(diveId), dive);
      void qc.invalidateQueries({ queryKey: campaignKeys.dives(dive.campaignId) });
      // Phases, the video clock and the gap setting all change what the summary says.
      void qc.invalidateQueries({ queryKey: telemetryKeys.summary(diveId) });
    },
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
