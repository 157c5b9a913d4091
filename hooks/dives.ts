import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';

import { type diveCreateSchema, diveSchema, type diveUpdateSchema, type DivePhase } from '@/lib/schemas';
import { request } from './api';
import { afterDiveChanged } from './cache-effects';
import { diveKeys } from './query-keys';

export { diveKeys };

export type DiveCreate = z.input<typeof diveCreateSchema>;
export type DiveUpdate = z.input<typeof diveUpdateSchema>;

export const diveQuery = (id: string) =>
  queryOptions({ queryKey: diveKeys.detail(id), queryFn: () => request(`/api/dives/${encodeURIComponent(id)}`, diveSchema) });

export const useDive = (id: string | undefined) => useQuery({ ...diveQuery(id ?? ''), enabled: !!id });

function useDiveMutation<I>(path: string, method: 'POST' | 'PATCH') {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: I) => request(path, diveSchema, { method, body: input }),
    onSuccess: (dive) => afterDiveChanged(qc, dive),
  });
}

const divePath = (diveId: string) => `/api/dives/${encodeURIComponent(diveId)}`;

/** Plans a dive of the campaign (lead, pilot). */
export const usePlanDive = (campaignId: string) =>
  useDiveMutation<DiveCreate>(`/api/campaigns/${encodeURIComponent(campaignId)}/dives`, 'POST');

export const useSetPhase = (diveId: string) =>
  useDiveMutation<{ phase: DivePhase; at?: string | null }>(`${divePath(diveId)}/phases`, 'POST');

export const useUpdateDive = (diveId: string) => useDiveMutation<DiveUpdate>(divePath(diveId), 'PATCH');
